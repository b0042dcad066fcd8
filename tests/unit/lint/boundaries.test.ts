/**
 * The house rules in eslint.config.js fail where they must: an import through
 * the `@/` alias is resolved (tsconfig paths) and held to the same zones as a
 * relative one, the server's layers point one way, and hooks declare what
 * they read. Each case lints a snippet as if it were the named file.
 */
import path from 'node:path';
import { ESLint } from 'eslint';

const root = path.resolve(__dirname, '../../..');
// Loaded with require so jest needs no ES-module loader for the config.
// eslint-disable-next-line @typescript-eslint/no-require-imports
const config = require(path.join(root, 'eslint.config.js'));
const eslint = new ESLint({ cwd: root, overrideConfigFile: true, overrideConfig: config });

async function problems(file: string, code: string) {
  const [result] = await eslint.lintText(code, { filePath: path.join(root, file) });
  return result.messages.map((m) => ({ rule: m.ruleId, message: m.message }));
}

describe('dependency zones through the @/ alias', () => {
  test('a route file that imports the server through @/ is refused', async () => {
    const found = await problems('app/x.tsx', "import { createApp } from '@/server/app';\nexport default createApp;\n");
    expect(found).toEqual([{ rule: 'import/no-restricted-paths', message: expect.stringContaining('app/ composes components and shared code only') }]);
  });

  test('the same import written as a relative path is refused the same way', async () => {
    const found = await problems('app/x.tsx', "import { createApp } from '../server/app';\nexport default createApp;\n");
    expect(found.map((p) => p.rule)).toEqual(['import/no-restricted-paths']);
  });

  test('a component that reaches into the server through @/ is refused', async () => {
    const found = await problems('components/x.tsx', "import { AppError } from '@/server/errors';\nexport const e = AppError;\n");
    expect(found).toEqual([{ rule: 'import/no-restricted-paths', message: expect.stringContaining('components/ may use shared/ only') }]);
  });

  test('shared code that imports a component through @/ is refused', async () => {
    const found = await problems('shared/x.ts', "import { colors } from '@/components/theme';\nexport const c = colors;\n");
    expect(found.map((p) => p.rule)).toEqual(['import/no-restricted-paths']);
  });

  test('a test file may import the server app through @/', async () => {
    expect(await problems('tests/api/x.test.ts', "import { createApp } from '@/server/app';\nexport default createApp;\n")).toEqual([]);
  });
});

describe("the server's layers", () => {
  test('a service that imports the http layer is refused', async () => {
    const found = await problems('server/services/x.ts', "import { labAccess } from '@/server/http/middleware/auth';\nexport const r = labAccess;\n");
    expect(found).toEqual([{ rule: 'import/no-restricted-paths', message: expect.stringContaining('services never import the http layer') }]);
  });

  test('the db layer that imports a service is refused, the demo seeder excepted', async () => {
    const code = "import { labsService } from '../services/labs';\nexport const l = labsService;\n";
    const found = await problems('server/db/x.ts', code);
    expect(found).toEqual([{ rule: 'import/no-restricted-paths', message: expect.stringContaining('the db layer never imports services') }]);
    expect(await problems('server/db/seeders/x.ts', code.replace('../services', '../../services'))).toEqual([]);
  });

  test('a database row typed as any fails the lint in services and repositories', async () => {
    const code = "export async function f(q: (sql: string) => Promise<any[]>) {\n  return q('SELECT 1');\n}\n";
    for (const file of ['server/services/x.ts', 'server/db/repositories/x.ts']) {
      const found = await problems(file, code);
      expect(found.map((p) => p.rule)).toEqual(['@typescript-eslint/no-explicit-any']);
      const [result] = await eslint.lintText(code, { filePath: path.join(root, file) });
      expect(result.errorCount).toBe(1);
    }
  });
});

describe('hooks', () => {
  test('an effect that reads a value it does not list is refused', async () => {
    const code = [
      "import { useEffect } from 'react';",
      'export function useTitle(title: string) {',
      '  useEffect(() => {',
      '    document.title = title;',
      '  }, []);',
      '}',
      '',
    ].join('\n');
    const found = await problems('components/x.ts', code);
    expect(found).toEqual([{ rule: 'react-hooks/exhaustive-deps', message: expect.stringContaining("missing dependency: 'title'") }]);
  });

  test('a hook called conditionally is refused', async () => {
    const code = [
      "import { useState } from 'react';",
      'export function useMaybe(on: boolean) {',
      '  if (on) useState(0);',
      '}',
      '',
    ].join('\n');
    expect((await problems('components/x.ts', code)).map((p) => p.rule)).toEqual(['react-hooks/rules-of-hooks']);
  });
});
