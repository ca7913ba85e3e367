import { redirect } from "react-router";
import type { Route } from "./+types/sign-out";
import { signOut } from "~/server/session.server.ts";

export async function action({ request }: Route.ActionArgs) {
  return signOut(request, "/");
}

export function loader() {
  return redirect("/");
}
