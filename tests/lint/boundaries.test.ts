import fs from 'node:fs';
import path from 'node:path';
import { ESLint } from 'eslint';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

// The dependency rules of the house are enforced by `npm run lint`; these cases prove each rule bites.
// Every probe file is written first and ESLint runs ONCE over all of them: resolving the import graph is
// the slow part (minutes on a busy 2-core machine), so it is paid once, not once per case.

const tag = `${process.pid}-${Math.random().toString(36).slice(2)}`;

interface Probe {
  name: string;
  /** Where the probe sits (the import rules resolve real files around it). */
  file: string;
  code: string;
  /** The rule that must fire, or null when the probe must lint clean. */
  rule: string | null;
}

/** A probe at `dir` importing `name` from the repository path `target`. */
function importing(name: string, dir: string, target: string, exported: string, rule: string | null): Probe {
  let specifier = path.relative(dir, target);
  if (!specifier.startsWith('.')) specifier = `./${specifier}`;
  return {
    name,
    file: `${dir}/zz-lint-probe-${tag}-${name.replace(/\W+/g, '-')}.ts`,
    code: `import { ${exported} } from '${specifier}';\nexport const x = ${exported};\n`,
    rule,
  };
}

const restricted = 'import/no-restricted-paths';
const PROBES: Probe[] = [
  importing('shared imports the server', 'shared/domain', 'server/app', 'createApp', restricted),
  importing('shared imports the client', 'shared', 'src/lib/api-client', 'api', restricted),
  importing('the client imports the server', 'src/lib', 'server/http/errors', 'NotFound', restricted),
  importing('the server imports the client', 'server', 'src/lib/api-client', 'api', restricted),
  importing('a server feature imports another', 'server/features/admin', 'server/features/auth/auth.repo', 'toUser', restricted),
  importing('the measurements module imports a feature', 'server/measurements', 'server/features/coupons/coupons.service', 'createCouponsService', restricted),
  importing('a client feature imports another', 'src/features/admin', 'src/features/auth/api/auth-queries', 'usersQuery', restricted),
  importing('shared client code imports a feature', 'src/lib', 'src/features/auth/api/auth-queries', 'usersQuery', restricted),
  importing('shared client code imports the app', 'src/components/ui', 'src/app/query-client', 'createQueryClient', restricted),
  importing('the client imports the domain barrel', 'src/features/runs', 'shared/domain/index', 'welchTest', 'no-restricted-imports'),
  importing('a shared rule the client loads imports the domain barrel', 'shared/runs', 'shared/domain/index', 'welchTest', 'no-restricted-imports'),
  {
    name: 'an auth or admin service queries the tables itself',
    file: `server/features/admin/zz-lint-probe-${tag}-drizzle.ts`,
    code: "import { eq } from 'drizzle-orm';\nexport const x = eq;\n",
    rule: 'no-restricted-imports',
  },
  importing('a trials service reads a table itself', 'server/features/trials', 'server/db/schema/trials', 'trials', 'no-restricted-imports'),
  importing('a coupons service reads a table itself', 'server/features/coupons', 'server/db/schema/coupons', 'photos', 'no-restricted-imports'),
  {
    name: 'a runs service builds a query itself',
    file: `server/features/runs/zz-lint-probe-${tag}-drizzle.ts`,
    code: "import { sql } from 'drizzle-orm';\nexport const x = sql;\n",
    rule: 'no-restricted-imports',
  },
  importing('a runs service calls its repo', 'server/features/runs', 'server/features/runs/runs.repo', 'countRuns', null),
  importing('an auth service calls its repo', 'server/features/auth', 'server/features/auth/auth.repo', 'toUser', null),
  {
    name: 'shared uses no Node APIs',
    file: `shared/zz-lint-probe-${tag}-node.ts`,
    code: "import fs from 'node:fs';\nexport const x = fs;\n",
    rule: 'no-restricted-imports',
  },
  {
    name: 'an import cycle fails',
    file: `server/zz-lint-probe-${tag}-a.ts`,
    code: `import { b } from './zz-lint-probe-${tag}-b';\nexport const a = () => b;\n`,
    rule: 'import/no-cycle',
  },
  importing('a server feature may import shared', 'server/features/auth', 'shared/constants/roles', 'ROLES', null),
  importing('a client feature may read the shared queries', 'src/features/findings', 'src/lib/queries/records', 'trialListQuery', null),
  importing('a client feature may import a domain module by its path', 'src/features/runs', 'shared/domain/vacuum', 'percentVacuum', null),
  ...['coupons', 'runs', 'trials'].map((f) =>
    importing(`the ${f} feature may call the measurements module`, `server/features/${f}`, 'server/measurements/measurements', 'createMeasurements', null),
  ),
];
// The other half of the cycle; not itself a case.
const HELPERS = [{ file: `server/zz-lint-probe-${tag}-b.ts`, code: `import { a } from './zz-lint-probe-${tag}-a';\nexport const b = () => a;\n` }];

const found = new Map<string, string[]>();

beforeAll(async () => {
  for (const p of [...PROBES, ...HELPERS]) fs.writeFileSync(path.resolve(p.file), p.code);
  try {
    const results = await new ESLint({ cwd: process.cwd() }).lintFiles(PROBES.map((p) => path.resolve(p.file)));
    for (const r of results)
      found.set(
        path.resolve(r.filePath),
        r.messages.map((m) => m.ruleId ?? m.message),
      );
  } finally {
    for (const p of [...PROBES, ...HELPERS]) fs.rmSync(path.resolve(p.file), { force: true });
  }
}, 600_000);

afterAll(() => {
  for (const p of [...PROBES, ...HELPERS]) fs.rmSync(path.resolve(p.file), { force: true });
});

describe('lint boundaries', () => {
  it.each(PROBES.filter((p) => p.rule).map((p) => [p.name, p] as const))('%s', (_name, p) => {
    expect(found.get(path.resolve(p.file))).toContain(p.rule);
  });

  it.each(PROBES.filter((p) => !p.rule).map((p) => [p.name, p] as const))('%s', (_name, p) => {
    expect(found.get(path.resolve(p.file))).toEqual([]);
  });
});
