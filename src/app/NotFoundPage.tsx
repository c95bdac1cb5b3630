import { Link } from "react-router-dom";
import { buttonClasses } from "../components/Button";
import { paths } from "../lib/paths";
import { useDocumentTitle } from "../lib/useDocumentTitle";

export function NotFoundPage() {
  useDocumentTitle("Page not found");
  return (
    <div className="text-center">
      <p className="text-sm font-semibold text-accent-700">404</p>
      <h1 className="mt-2 text-2xl font-semibold tracking-tight">This page does not exist</h1>
      <p className="mt-3 text-stone-600">The address may be mistyped, or the page may have moved.</p>
      <Link to={paths.home} className={buttonClasses("primary", "md", "mt-6")}>
        Go to your studies
      </Link>
    </div>
  );
}
