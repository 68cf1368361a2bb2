import { LaterRelease, Page } from '../../components/ui/page';

/** Screens that later releases deliver. Each says plainly what it will do; none shows fake data. */
export function ImportsLater() {
  return (
    <Page title="Imports">
      <LaterRelease what="Upload the CSV file a lab balance or shop scale writes, map its columns, preview the rows with their problems, then commit or undo." />
    </Page>
  );
}
export function FindingsLater() {
  return (
    <Page title="Findings">
      <LaterRelease what="Write a conclusion with its evidence, submit it for review, and have a reviewer approve it with a signature." />
    </Page>
  );
}
export function WikiLater() {
  return (
    <Page title="Wiki">
      <LaterRelease what="Approved findings by species and resin, with their numbers and plots frozen at approval." />
    </Page>
  );
}
export function NotFoundScreen() {
  return (
    <Page title="Not found">
      <p>There is no page at this address.</p>
    </Page>
  );
}
