import "react-router";

declare module "react-router" {
  interface AppLoadContext {
    cspNonce?: string;
  }
}
