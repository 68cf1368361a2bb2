import { Link } from 'react-router-dom';
import { paths } from '../../config/paths';
import { Page } from '../../components/ui/page';

export function NotFoundScreen() {
  return (
    <Page title="Not found">
      <p>
        There is no page at this address. <Link to={paths.bench.href()}>Back to the Bench</Link>
      </p>
    </Page>
  );
}
