import { LaterRelease, Page } from '../../../components/ui/page';

/** Placeholder until this screen is built: says plainly what it will do and shows no made-up data. */
export function FindingsScreen() {
  return (
    <Page title="Findings">
      <LaterRelease what="Write a conclusion with its evidence, submit it for review, and have a reviewer approve it with a signature." />
    </Page>
  );
}
