// PostgreSQL errors that mean a user's request cannot be done now (not a server fault).

function code(error: unknown): string | undefined {
  const e = error as { code?: string; cause?: { code?: string } };
  return e?.code ?? e?.cause?.code;
}

/** Raised by the study triggers: the study is not running, or it is closed. */
export function isStudyFrozenError(error: unknown) {
  return code(error) === "BC409";
}

export function isUniqueViolation(error: unknown) {
  return code(error) === "23505";
}

export function isSerializationFailure(error: unknown) {
  return code(error) === "40001" || code(error) === "40P01";
}
