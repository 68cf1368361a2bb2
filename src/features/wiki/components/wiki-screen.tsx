import { LaterRelease, Page } from '../../../components/ui/page';

/** Placeholder until this screen is built: says plainly what it will do and shows no made-up data. */
export function WikiScreen() {
  return (
    <Page title="Wiki">
      <LaterRelease what="Approved findings by species and resin, with their numbers and plots frozen at approval." />
    </Page>
  );
}
