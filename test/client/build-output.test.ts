// Checks of the production client build (dist/client/browser, from `npx ng build`), skipped when
// no build exists. References: the Content-Security-Policy in server/app.ts (script-src 'self',
// no inline scripts or handlers, font-src 'self'), the rule that nothing is loaded from an
// outside host, and the limit of 350 kB gzip for the initial JavaScript.
import { existsSync, readFileSync, readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { gzipSync } from 'node:zlib';
import { expect } from 'chai';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const browserDir = path.join(root, 'dist/client/browser');
const indexFile = path.join(browserDir, 'index.html');

/** The issue family's limit for the initial JavaScript, gzip-compressed (kB = 1000 bytes). */
const INITIAL_JS_GZIP_LIMIT = 350_000;

const outsideUrl = /\b(?:https?:|wss?:|ftp:)?\/\/[a-z0-9.-]+\.[a-z]{2,}/gi;

function kB(bytes: number): string {
  return `${(bytes / 1000).toFixed(1)} kB`;
}

function listFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true, recursive: true })
    .filter((entry) => entry.isFile())
    .map((entry) => path.join(entry.parentPath, entry.name));
}

/** Angular budgets accept sizes like "1MB", "750kB", "900b"; they count 1 kB as 1000 bytes. */
function parseBudget(size: string): number {
  const match = /^([\d.]+)\s*(b|kb|mb|gb)?$/i.exec(size.trim());
  if (!match) throw new Error(`cannot read budget size ${size}`);
  const unit = (match[2] ?? 'b').toLowerCase();
  const factor = { b: 1, kb: 1000, mb: 1000 ** 2, gb: 1000 ** 3 }[unit as 'b' | 'kb' | 'mb' | 'gb'];
  return Number(match[1]) * factor;
}

/** Static `import … from "./x.js"`, `import "./x.js"` and `export … from "./x.js"` (not `import("./x.js")`). */
const staticImport = /(?:^|[;\s}])(?:import|export)\s*(?:[^"'();]*?\bfrom\s*)?["'](\.\/[^"']+\.js)["']/g;

/** `entries` and every chunk reachable from them through static imports, in discovery order. */
function staticClosure(entries: string[]): string[] {
  const seen = new Set<string>();
  const queue = [...entries];
  while (queue.length > 0) {
    const file = queue.shift()!;
    if (seen.has(file)) continue;
    seen.add(file);
    const code = readFileSync(path.join(browserDir, file), 'utf8');
    for (const match of code.matchAll(staticImport)) {
      const target = path.posix.normalize(path.posix.join(path.posix.dirname(file), match[1]!));
      if (!seen.has(target)) queue.push(target);
    }
  }
  return [...seen];
}

describe('client build output', function () {
  let html = '';

  before(function () {
    if (!existsSync(indexFile)) {
      console.log('      (no dist/client/browser/index.html: run `npx ng build` to check the build output)');
      this.skip();
    }
    html = readFileSync(indexFile, 'utf8');
  });

  it('index.html has no inline script, no inline event handler and no outside host', () => {
    const scripts = [...html.matchAll(/<script\b([^>]*)>([\s\S]*?)<\/script>/gi)];
    expect(scripts.length, 'index.html loads at least one script').to.be.greaterThan(0);
    for (const [, attributes, body] of scripts) {
      expect(attributes, 'every script is a file (script-src self)').to.match(/\bsrc="[^"]+"/);
      expect(body!.trim(), 'no inline script body').to.equal('');
    }
    expect(html, 'no inline event handler such as onload= (blocked by the CSP)').not.to.match(/\son[a-z]+\s*=/i);
    expect(html.match(outsideUrl) ?? [], 'no outside host in index.html').to.deep.equal([]);
    for (const [, url] of html.matchAll(/\b(?:src|href)="([^"]+)"/gi)) {
      expect(url, 'every reference is relative to the app').not.to.match(/^[a-z]+:|^\/\//i);
    }
  });

  it('all CSS references only files of the app, and the fonts it references are emitted', () => {
    const cssFiles = listFiles(browserDir).filter((file) => file.endsWith('.css'));
    expect(cssFiles.length, 'the build has a global stylesheet').to.be.greaterThan(0);
    let fontReferences = 0;
    for (const file of cssFiles) {
      const css = readFileSync(file, 'utf8');
      const name = path.relative(browserDir, file);
      expect(css.match(/https?:\/\/[^\s"')]+/gi) ?? [], `no http(s) URL in ${name}`).to.deep.equal([]);
      expect(css.match(outsideUrl) ?? [], `no outside host in ${name}`).to.deep.equal([]);
      expect(css, `no @import in ${name}`).not.to.match(/@import\b/);
      for (const [, quoted] of css.matchAll(/url\(\s*([^)]*?)\s*\)/gi)) {
        const ref = quoted!.replace(/^["']|["']$/g, '');
        if (ref.startsWith('data:') || ref.startsWith('#')) continue;
        expect(ref, `relative url() in ${name}`).not.to.match(/^[a-z]+:|^\/\//i);
        const target = path.resolve(path.dirname(file), ref.split(/[?#]/, 1)[0]!);
        expect(existsSync(target), `${ref} (from ${name}) exists in the build`).to.equal(true);
        if (/\.woff2?$/.test(target)) fontReferences += 1;
      }
    }
    const css = cssFiles.map((file) => readFileSync(file, 'utf8')).join('\n');
    for (const family of ['Roboto', 'JetBrains Mono', 'Material Symbols Outlined']) {
      expect(css, `@font-face for ${family}`).to.match(new RegExp(`font-family:\\s*["']?${family}`));
    }
    expect(fontReferences, 'self-hosted font files are referenced').to.be.greaterThan(0);
  });

  it(`initial JavaScript is under ${kB(INITIAL_JS_GZIP_LIMIT)} gzip, and the raw budget in angular.json keeps it there`, () => {
    // The initial JavaScript is the entry script and everything it imports statically, followed
    // through the chunks (index.html preloads only some of them, so its links are not the list).
    const entries = [...html.matchAll(/<script\b[^>]*\bsrc="([^"]+\.js)"/gi)].map((m) => m[1]!);
    expect(entries.length).to.be.greaterThan(0);
    const initial = staticClosure(entries);
    const preloaded = [...html.matchAll(/<link\b[^>]*rel="modulepreload"[^>]*href="([^"]+\.js)"/gi)].map((m) => m[1]!);
    for (const file of preloaded) expect(initial, `preloaded ${file} is part of the initial set`).to.include(file);
    let raw = 0;
    let gzip = 0;
    for (const file of initial) {
      const bytes = readFileSync(path.join(browserDir, file));
      const packed = gzipSync(bytes, { level: 9 }).length;
      raw += bytes.length;
      gzip += packed;
      console.log(`      ${file.padEnd(28)} ${kB(bytes.length).padStart(10)} raw ${kB(packed).padStart(10)} gzip`);
    }
    const ratio = gzip / raw;
    console.log(`      initial JS: ${kB(raw)} raw, ${kB(gzip)} gzip (gzip/raw ${ratio.toFixed(3)})`);
    expect(gzip, 'initial JS gzip size').to.be.lessThan(INITIAL_JS_GZIP_LIMIT);

    // Angular budgets measure raw bytes: at this build's compression ratio, the raw error budget
    // must still stay under the gzip limit (with 15 % headroom for code that compresses worse).
    const angularJson = JSON.parse(readFileSync(path.join(root, 'angular.json'), 'utf8'));
    const budgets: { type: string; maximumError?: string }[] =
      angularJson.projects.spreadproof.architect.build.configurations.production.budgets;
    const initialBudget = budgets.find((b) => b.type === 'initial')?.maximumError;
    expect(initialBudget, 'angular.json has an initial maximumError budget').to.be.a('string');
    const budgetBytes = parseBudget(initialBudget!);
    const gzipAtBudget = budgetBytes * ratio * 1.15;
    console.log(`      raw budget ${initialBudget} ≈ ${kB(gzipAtBudget)} gzip at this ratio (+15 %)`);
    expect(gzipAtBudget, 'raw initial budget corresponds to less than the gzip limit').to.be.lessThan(INITIAL_JS_GZIP_LIMIT);
  });
});
