// Every address of the client, in one place: the router declares its routes with `path`, and screens
// link with `href(...)`, so a renamed route changes here and nowhere else. (The server writes the
// addresses of the reset and invitation links into e-mails itself; keep those two in step.)

type ParamNames<P extends string> = P extends `${string}:${infer Name}/${infer Rest}`
  ? Name | ParamNames<`/${Rest}`>
  : P extends `${string}:${infer Name}`
    ? Name
    : never;

/** Query-string values; empty, null and undefined values are left out. */
export type SearchValues = Record<string, string | number | boolean | null | undefined>;

type Href<P extends string> = [ParamNames<P>] extends [never]
  ? (search?: SearchValues, hash?: string) => string
  : (params: Record<ParamNames<P>, string | number>, search?: SearchValues, hash?: string) => string;

export interface AppPath<P extends string> {
  /** The router's pattern, e.g. `/runs/:id`. */
  readonly path: P;
  /** A link to it: `paths.run.href({ id: 7 }, { stage: 'soak' }, 'stage-soak')` → `/runs/7?stage=soak#stage-soak`. */
  readonly href: Href<P>;
}

function build(path: string, params: Record<string, string | number>, search?: SearchValues, hash?: string): string {
  const filled = path.replace(/:(\w+)/g, (_, name: string) => {
    const v = params[name];
    if (v === undefined) throw new Error(`The address ${path} needs ${name}`);
    return encodeURIComponent(String(v));
  });
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(search ?? {})) if (v !== undefined && v !== null && v !== '') q.set(k, String(v));
  const qs = q.toString();
  return `${filled}${qs ? `?${qs}` : ''}${hash ? `#${hash}` : ''}`;
}

function route<P extends string>(path: P): AppPath<P> {
  const hasParams = path.includes(':');
  const href = hasParams
    ? (params: Record<string, string | number>, search?: SearchValues, hash?: string) => build(path, params, search, hash)
    : (search?: SearchValues, hash?: string) => build(path, {}, search, hash);
  return { path, href: href as Href<P> };
}

export const paths = {
  // Signed out
  signIn: route('/sign-in'),
  forgotPassword: route('/forgot-password'),
  resetPassword: route('/reset-password'),
  acceptInvitation: route('/accept-invitation'),

  // Signed in
  bench: route('/'),
  trials: route('/trials'),
  trialNew: route('/trials/new'),
  trial: route('/trials/:id'),
  trialEdit: route('/trials/:id/edit'),
  trialLabels: route('/trials/:id/labels'),
  /** The entry grid of a trial's coupons (the coupon list filtered by trial is `coupons.href({ trialId })`). */
  trialCoupons: route('/trials/:id/coupons'),
  runs: route('/runs'),
  runNew: route('/runs/new'),
  run: route('/runs/:id'),
  runCoupons: route('/runs/:id/coupons'),
  coupons: route('/coupons'),
  coupon: route('/coupons/:id'),
  imports: route('/imports'),
  import: route('/imports/:id'),
  compare: route('/compare'),
  compareView: route('/compare/views/:id'),
  findings: route('/findings'),
  findingNew: route('/findings/new'),
  finding: route('/findings/:id'),
  wiki: route('/wiki'),
  wikiPage: route('/wiki/:slug'),
  reference: route('/reference'),
  preferences: route('/preferences'),
  admin: route('/admin'),
  adminUsers: route('/admin/users'),
  adminOutbox: route('/admin/outbox'),
  adminSettings: route('/admin/settings'),
} as const;

export type PathName = keyof typeof paths;
