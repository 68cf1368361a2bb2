import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { paths } from '../../config/paths';
import { Page } from './page';

function describe(error: unknown): { title: string; message: string } {
  if (isRouteErrorResponse(error)) {
    if (error.status === 404) return { title: 'Not found', message: 'There is no page at this address.' };
    return { title: 'This page failed', message: `The page answered ${error.status} ${error.statusText}`.trim() };
  }
  // A screen's code that cannot be fetched (the app was updated, or the connection dropped).
  if (error instanceof TypeError && /dynamically imported module|Importing a module script failed|Failed to fetch/i.test(error.message)) {
    return { title: 'This page could not load', message: 'Part of the app could not be downloaded. Check the connection, then reload the page.' };
  }
  return { title: 'This page failed', message: error instanceof Error && error.message ? error.message : 'Something went wrong while showing this page.' };
}

/** The error element of every route: says what failed and offers a way back. Nothing typed elsewhere is lost. */
export function RouteError() {
  const error = useRouteError();
  const { title, message } = describe(error);
  return (
    <Page title={title}>
      <div role="alert" className="sheet max-w-2xl p-6">
        <p className="mb-4">{message}</p>
        <p className="flex flex-wrap gap-3">
          <Link to={paths.bench.href()} className="btn-primary no-underline">
            Back to the Bench
          </Link>
          <button type="button" className="btn-quiet" onClick={() => window.location.reload()}>
            Reload this page
          </button>
        </p>
      </div>
    </Page>
  );
}
