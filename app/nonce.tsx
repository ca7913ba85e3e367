import { createContext, useContext } from "react";

// The CSP nonce of the current response, set by entry.server.tsx. On the client
// it is empty: browsers hide nonce attributes from scripts anyway.
export const NonceContext = createContext<string>("");
export const useNonce = () => useContext(NonceContext);
