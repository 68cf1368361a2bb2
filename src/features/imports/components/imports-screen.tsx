import { LaterRelease, Page } from '../../../components/ui/page';

/** Placeholder until this screen is built: says plainly what it will do and shows no made-up data. */
export function ImportsScreen() {
  return (
    <Page title="Imports">
      <LaterRelease what="Upload the CSV file a lab balance or shop scale writes, map its columns, preview the rows with their problems, then commit or undo." />
    </Page>
  );
}
