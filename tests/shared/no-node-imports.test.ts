// shared/ runs unchanged in the browser bundle and on the server, so no Node-only module or
// global may appear in it.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../../', import.meta.url));
const sharedDir = join(root, 'shared');

function tsFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name);
    if (statSync(full).isDirectory()) return tsFiles(full);
    return name.endsWith('.ts') ? [full] : [];
  });
}

const builtins = new Set(builtinModules.flatMap((m) => [m, `node:${m}`]));
const importRe = /(?:import|export)\s[^'"]*?from\s*['"]([^'"]+)['"]|import\s*\(\s*['"]([^'"]+)['"]\s*\)|require\s*\(\s*['"]([^'"]+)['"]\s*\)|import\s+['"]([^'"]+)['"]/g;
const nodeGlobalsRe = /\b(Buffer|process|__dirname|__filename|require)\b\s*[.(]/;

/** Node-only imports and globals used in one source text. */
function offences(text: string): string[] {
  const found: string[] = [];
  for (const m of text.matchAll(importRe)) {
    const spec = m[1] ?? m[2] ?? m[3] ?? m[4] ?? '';
    if (builtins.has(spec) || spec.startsWith('node:')) found.push(`imports ${spec}`);
  }
  const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/\/\/.*$/gm, '');
  const g = code.match(nodeGlobalsRe);
  if (g) found.push(`uses ${g[1]}`);
  return found;
}

describe('shared/ has no Node-only imports', () => {
  it('the scanner catches fs, path, crypto, node: imports and Buffer', () => {
    expect(offences("import { readFileSync } from 'fs';")).toEqual(['imports fs']);
    expect(offences("import path from 'node:path';")).toEqual(['imports node:path']);
    expect(offences("const c = await import('crypto');")).toEqual(['imports crypto']);
    expect(offences('const b = Buffer.from("x");')).toEqual(['uses Buffer']);
    expect(offences("import { z } from 'zod';")).toEqual([]);
  });

  it('no file under shared/ imports a Node built-in or uses a Node global', () => {
    const files = tsFiles(sharedDir);
    expect(files.length).toBeGreaterThan(5);
    const problems = files.flatMap((f) => offences(readFileSync(f, 'utf8')).map((o) => `${relative(root, f)}: ${o}`));
    expect(problems).toEqual([]);
  });
});
