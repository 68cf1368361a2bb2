import { LaterRelease, Page } from '../../../components/ui/page';

/** Placeholder until this screen is built: says plainly what it will do and shows no made-up data. */
export function CompareScreen() {
  return (
    <Page title="Compare">
      <LaterRelease what="Resin uptake plotted against species density and thickness, by species and resin, with fitted lines, confidence bands and two-group tests." />
    </Page>
  );
}
