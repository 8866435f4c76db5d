import { data } from "react-router";

// Any unknown path: a 404 the root error boundary explains in plain words.
export function loader() {
  throw data({ error: "Page not found." }, { status: 404 });
}

export default function NotFound() {
  return null;
}
