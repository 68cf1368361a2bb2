import fs from 'node:fs';
import path from 'node:path';
import { ESLint } from 'eslint';
import { describe, expect, it } from 'vitest';

// The dependency rules of the house are enforced by `npm run lint`; these cases prove each rule bites.
const eslint = new ESLint({ cwd: process.cwd() });

/** Lints a probe file written for a moment at `filePath` (the import rules resolve real files). */
async function ruleIds(filePath: string, code: string): Promise<string[]> {
  const file = path.resolve(filePath.replace(/zz-probe\.ts$/, `zz-lint-probe-${process.pid}-${Math.random().toString(36).slice(2)}.ts`));
  fs.writeFileSync(file, code);
  try {
    const [result] = await eslint.lintFiles([file]);
    return (result?.messages ?? []).map((m) => m.ruleId ?? m.message);
  } finally {
    fs.rmSync(file, { force: true });
  }
}

// The first probe makes ESLint resolve the whole import graph: minutes on a busy 2-core machine.
describe('lint boundaries', { timeout: 180_000 }, () => {
  // [what is broken, where the probe file sits, the repo path it imports, a name exported there]
  it.each([
    ['shared imports the server', 'shared/domain/zz-probe.ts', 'server/app', 'createApp'],
    ['shared imports the client', 'shared/zz-probe.ts', 'src/lib/api-client', 'api'],
    ['the client imports the server', 'src/lib/zz-probe.ts', 'server/http/errors', 'NotFound'],
    ['the server imports the client', 'server/zz-probe.ts', 'src/lib/api-client', 'api'],
    ['a server feature imports another', 'server/features/admin/zz-probe.ts', 'server/features/auth/auth.repo', 'toUser'],
    ['the measurements module imports a feature', 'server/measurements/zz-probe.ts', 'server/features/coupons/coupons.service', 'createCouponsService'],
    ['a client feature imports another', 'src/features/admin/zz-probe.ts', 'src/features/auth/api/auth-queries', 'usersQuery'],
    ['shared client code imports a feature', 'src/lib/zz-probe.ts', 'src/features/auth/api/auth-queries', 'usersQuery'],
    ['shared client code imports the app', 'src/components/ui/zz-probe.ts', 'src/app/query-client', 'createQueryClient'],
  ])('%s → import/no-restricted-paths', async (_name, file, target, name) => {
    let specifier = path.relative(path.dirname(file), target);
    if (!specifier.startsWith('.')) specifier = `./${specifier}`;
    expect(await ruleIds(file, `import { ${name} } from '${specifier}';\nexport const x = ${name};`)).toContain('import/no-restricted-paths');
  });

  it('shared uses no Node APIs', async () => {
    expect(await ruleIds('shared/zz-probe.ts', "import fs from 'node:fs';\nexport const x = fs;")).toContain('no-restricted-imports');
  });

  it('an import cycle fails', async () => {
    const tag = `${process.pid}-${Math.random().toString(36).slice(2)}`;
    const a = path.resolve(`server/zz-lint-probe-a-${tag}.ts`);
    const b = path.resolve(`server/zz-lint-probe-b-${tag}.ts`);
    fs.writeFileSync(a, `import { b } from './zz-lint-probe-b-${tag}';\nexport const a = () => b;\n`);
    fs.writeFileSync(b, `import { a } from './zz-lint-probe-a-${tag}';\nexport const b = () => a;\n`);
    try {
      const [result] = await eslint.lintFiles([a]);
      expect(result?.messages.map((m) => m.ruleId)).toContain('import/no-cycle');
    } finally {
      fs.rmSync(a, { force: true });
      fs.rmSync(b, { force: true });
    }
  });

  it('allowed directions pass', async () => {
    const specifier = path.relative('server/features/auth', 'shared/constants/roles');
    expect(await ruleIds('server/features/auth/zz-probe.ts', `import { ROLES } from '${specifier}';\nexport const x = ROLES;`)).toEqual([]);
  });

  it.each(['coupons', 'runs', 'trials'])('the %s feature may call the measurements module', async (f) => {
    const specifier = path.relative(`server/features/${f}`, 'server/measurements/measurements');
    expect(await ruleIds(`server/features/${f}/zz-probe.ts`, `import { createMeasurements } from '${specifier}';\nexport const x = createMeasurements;`)).toEqual([]);
  });
});
