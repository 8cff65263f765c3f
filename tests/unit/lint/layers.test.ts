/**
 * The layer rules of eslint.config.mjs (DEVELOPERS.md, "Architecture") fire on a file that breaks
 * them, and stay quiet on one that keeps them: each case lints a small file at a path inside the
 * project (it is never written to disk) with the project's own ESLint configuration.
 */
import path from 'node:path';
import { ESLint } from 'eslint';
import { beforeAll, describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '../../..');
let eslint: ESLint;

beforeAll(() => {
  eslint = new ESLint({ cwd: root });
});

/** The rule ids reported for `code` as if it were the file `file` (relative to the project). */
async function rulesFor(file: string, code: string): Promise<string[]> {
  const [result] = await eslint.lintText(code, { filePath: path.join(root, file) });
  return result.messages.map((m) => m.ruleId ?? `fatal: ${m.message}`);
}

describe('lib/stats imports nothing of ours outside lib/stats', () => {
  it('refuses an alias import of another room', async () => {
    expect(await rulesFor('lib/stats/layer-probe.ts', "import { AppError } from '@/lib/errors';\nexport const e = AppError;\n")).toContain('no-restricted-imports');
  });
  it('refuses a relative import that leaves lib/stats', async () => {
    expect(await rulesFor('lib/stats/estimators/layer-probe.ts', "import { AppError } from '../../errors';\nexport const e = AppError;\n")).toContain(
      'import/no-restricted-paths',
    );
  });
  it('refuses I/O and the unseeded generator', async () => {
    expect(await rulesFor('lib/stats/layer-probe.ts', "import { readFileSync } from 'node:fs';\nexport const f = readFileSync;\n")).toContain('no-restricted-imports');
    expect(await rulesFor('lib/stats/layer-probe.ts', 'export const u = Math.random();\n')).toContain('no-restricted-properties');
  });
  it('allows lib/stats itself, by alias and by relative path, and packages', async () => {
    const code = "import { normalCdf } from '../normal';\nimport { createRng } from '@/lib/stats/random';\nimport erfc from '@stdlib/math-base-special-erfc';\nexport const all = [normalCdf, createRng, erfc];\n";
    expect(await rulesFor('lib/stats/estimators/layer-probe.ts', code)).toEqual([]);
  });
});

describe('nothing below app/ imports from app/', () => {
  for (const file of ['components/layer-probe.tsx', 'lib/fits/layer-probe.ts', 'workers/layer-probe.ts']) {
    it(`refuses ${file.split('/')[0]} -> app`, async () => {
      const code = "import { changePasswordAction } from '@/app/(app)/account/actions';\nexport const a = changePasswordAction;\n";
      expect(await rulesFor(file, code)).toContain('import/no-restricted-paths');
    });
  }
  it('allows app -> components and lib', async () => {
    const code = "import { FormState } from '@/components/form-state';\nimport { AppError } from '@/lib/errors';\nexport const x: FormState | AppError | null = null;\n";
    expect(await rulesFor('app/(app)/layer-probe.ts', code)).toEqual([]);
  });
});

describe('Drizzle tables only in the data access layer', () => {
  const table = "import { datasets } from '@/db/schema';\nexport const t = datasets;\n";
  for (const file of ['lib/fits/layer-probe.ts', 'lib/ingest/layer-probe.ts', 'lib/jobs/kinds/layer-probe.ts', 'workers/handlers/layer-probe.ts', 'components/layer-probe.tsx', 'app/api/layer-probe/route.ts']) {
    it(`refuses a table in ${file}`, async () => {
      expect(await rulesFor(file, table)).toContain('@typescript-eslint/no-restricted-imports');
    });
  }
  it('allows tables in lib/dal and the queue', async () => {
    expect(await rulesFor('lib/dal/layer-probe.ts', table)).toEqual([]);
    expect(await rulesFor('lib/jobs/queue.ts', "import { jobs } from '@/db/schema';\nexport const t = jobs;\n")).toEqual([]);
  });
  it('allows types and enum lists everywhere', async () => {
    const code = "import { assetClasses, roles, type Dataset } from '@/db/schema';\nimport type { users } from '@/db/schema';\nexport const x: [typeof assetClasses, typeof roles, Dataset | null, typeof users | null] = [assetClasses, roles, null, null];\n";
    expect(await rulesFor('lib/fits/layer-probe.ts', code)).toEqual([]);
  });
});
