import { Link, isRouteErrorResponse, useRouteError } from "react-router-dom";
import { ApiError } from "../api/client";
import { Page, Notice } from "../components/page";

/** Shown when a page cannot be loaded: missing, not for this role, or a failure — with what to do next. */
export function RouteError() {
  const error = useRouteError();
  let title = "This page could not be shown.";
  let detail = "Something went wrong while loading it. Reload the page; if it keeps happening, tell your administrator.";
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) {
      title = "There is nothing at this address.";
      detail = "The page may have moved, or the link is mistyped. Use the navigation above.";
    } else if (error.status === 403) {
      title = "This page is not part of your role's work.";
      detail = "Your account cannot use this screen. If you need it, ask an administrator to change your access.";
    }
  } else if (error instanceof ApiError) {
    title = error.status === 404 ? "Not found, or not shared with you." : "The server could not answer.";
    detail = error.message;
  }
  return (
    <Page title={title}>
      <Notice tone="warn" title={detail}>
        <Link to="/" className="font-semibold text-accent underline">Go to your start page</Link>
      </Notice>
    </Page>
  );
}
