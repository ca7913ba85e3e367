import { startTransition, StrictMode } from "react";
import { hydrateRoot } from "react-dom/client";
import { HydratedRouter } from "react-router/dom";
import { z } from "zod";

// zod probes for eval with `new Function` on first use; the CSP forbids eval, so tell
// zod not to try (it then parses without generated code, and no violation is reported).
z.config({ jitless: true });

startTransition(() => {
  hydrateRoot(
    document,
    <StrictMode>
      <HydratedRouter />
    </StrictMode>,
  );
});
