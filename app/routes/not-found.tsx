import { data } from "react-router";
import { ErrorPage } from "~/components/error-page.tsx";

export function loader() {
  throw data("This page does not exist, or it belongs to a lab you are not a member of.", { status: 404 });
}

export default function NotFound() {
  return <ErrorPage status={404} />;
}
