import { pgEnum } from "drizzle-orm/pg-core";

/** What a study is for: a comparison ("trial"), a lab's reference series, or a repeatability study. */
export const studyKind = pgEnum("study_kind", ["trial", "reference", "precision"]);
export type StudyKind = (typeof studyKind.enumValues)[number];
