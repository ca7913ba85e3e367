import "react-router";

declare module "react-router" {
  interface AppLoadContext {
    cspNonce?: string;
    /** The client's address as the server sees it (a proxy's header only with TRUST_PROXY). */
    clientAddress?: string;
  }
}
