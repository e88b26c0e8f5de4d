import { existsSync } from 'node:fs';
import { expect } from 'chai';
import fc from 'fast-check';
import katex from 'katex';
import { Parser } from 'htmlparser2';
import { NoteTooLongError, renderNote } from '@shared/engine/note';
import { chromiumPath, launchChromium } from '../support/browser';

// Hostile notes: every payload tries to run `window.__pwned = 1` (or alert) or to load something.
// Classic vectors after the OWASP XSS filter evasion cheat sheet (common practice), plus the
// KaTeX commands that its documentation lists as needing `trust` (\href, \url, \includegraphics,
// \htmlClass, \htmlId, \htmlStyle, \htmlData).
const HOSTILE: string[] = [
  '<script>window.__pwned = 1</script>',
  '<SCRIPT SRC=http://xss.invalid/xss.js></SCRIPT>',
  '<img src=x onerror="window.__pwned = 1">',
  '<img src="javascript:window.__pwned=1">',
  '<svg onload="window.__pwned = 1"><circle r="10"/></svg>',
  '<svg><script>window.__pwned = 1</script></svg>',
  '<math><mtext><a href="javascript:window.__pwned=1">math link</a></mtext></math>',
  '<math href="javascript:window.__pwned=1"><mi>x</mi></math>',
  '<iframe src="javascript:window.top.__pwned=1"></iframe>',
  '<iframe srcdoc="<script>parent.__pwned=1</script>"></iframe>',
  '<object data="javascript:window.__pwned=1"></object>',
  '<embed src="javascript:window.__pwned=1">',
  '<style>body { background: url("javascript:window.__pwned=1") }</style>',
  '<link rel="stylesheet" href="http://xss.invalid/x.css">',
  '<meta http-equiv="refresh" content="0;url=javascript:window.__pwned=1">',
  '<base href="javascript:window.__pwned=1//">',
  '<form action="javascript:window.__pwned=1"><button>go</button></form>',
  '<button formaction="javascript:window.__pwned=1">go</button>',
  '<div style="background-image: url(javascript:window.__pwned=1)">styled</div>',
  '<div style="width: expression(window.__pwned=1)">old IE</div>',
  '<a href="javascript:window.__pwned=1">plain</a>',
  '<a href="JaVaScRiPt:window.__pwned=1">mixed case</a>',
  '<a href="&#106;avascript:window.__pwned=1">entity</a>',
  '<a href="&#x6A;&#x61;&#x76;&#x61;&#x73;&#x63;&#x72;&#x69;&#x70;&#x74;&#x3A;window.__pwned=1">hex entities</a>',
  '<a href="java\tscript:window.__pwned=1">tab</a>',
  '<a href=" javascript:window.__pwned=1">space</a>',
  '<a href="vbscript:msgbox(1)">vb</a>',
  '<a href="data:text/html;base64,PHNjcmlwdD53aW5kb3cuX19wd25lZD0xPC9zY3JpcHQ+">data</a>',
  '<a href="//xss.invalid/">protocol-relative</a>',
  '<a href="https://example.org" onclick="window.__pwned=1">handler</a>',
  '<a href="https://example.org" onmouseover="window.__pwned=1">hover</a>',
  '<p onclick="window.__pwned=1">para</p>',
  '<details open ontoggle="window.__pwned=1"><summary>x</summary></details>',
  '<body onload="window.__pwned=1">',
  '<input autofocus onfocus="window.__pwned=1">',
  '<video><source onerror="window.__pwned=1"></video>',
  '<noscript><p title="</noscript><img src=x onerror=window.__pwned=1>"></noscript>',
  '<textarea><img src=x onerror=window.__pwned=1></textarea>',
  '<template><img src=x onerror=window.__pwned=1></template>',
  '[markdown link](javascript:window.__pwned=1)',
  '[markdown link](JAVASCRIPT:window.__pwned=1)',
  '[data link](data:text/html;base64,PHNjcmlwdD53aW5kb3cuX19wd25lZD0xPC9zY3JpcHQ+)',
  '![image](javascript:window.__pwned=1)',
  '![image](data:image/svg+xml;base64,PHN2ZyBvbmxvYWQ9IndpbmRvdy5fX3B3bmVkPTEiLz4=)',
  '![tracker](http://xss.invalid/pixel.png)',
  '![alt with $x$ math](http://xss.invalid/a.png)',
  '[ref link][r]\n\n[r]: javascript:window.__pwned=1',
  '<http://xss.invalid/autolink> and javascript:window.__pwned=1',
  '$\\href{javascript:window.__pwned=1}{click me}$',
  '$\\url{javascript:window.__pwned=1}$',
  '$$\\href{data:text/html,<script>window.__pwned=1</script>}{x}$$',
  '$\\includegraphics{http://xss.invalid/x.png}$',
  '$\\htmlClass{mat-app-background}{x}$',
  '$\\htmlId{pwn}{x}$',
  '$\\htmlStyle{background:url(javascript:window.__pwned=1)}{x}$',
  '$\\htmlData{foo=bar}{x}$',
  '$\\text{<img src=x onerror=window.__pwned=1>}$',
  '$\\textcolor{red"onmouseover="window.__pwned=1}{x}$',
  '$\\color{url(javascript:window.__pwned=1)} x$',
  '$\\rule{100000em}{100000em}$',
  '$\\def\\a{\\a\\a}\\a$',
  '$</span><script>window.__pwned=1</script>$',
  '`<script>window.__pwned=1</script>` in code',
  '```html\n<script>window.__pwned=1</script>\n```',
  'marker spoof \uE0000\uE001 and \uE00012\uE001',
  '<a href="https://example.org" title="\uE0000\uE001">title marker</a> $x$',
];

/** Every element and attribute of an HTML string, as parsed by htmlparser2. */
function elementsOf(html: string): Array<{ name: string; attributes: Record<string, string> }> {
  const found: Array<{ name: string; attributes: Record<string, string> }> = [];
  const parser = new Parser(
    { onopentag: (name, attributes) => found.push({ name, attributes }) },
    { decodeEntities: true, lowerCaseAttributeNames: false },
  );
  parser.write(html);
  parser.end();
  return found;
}

const FORBIDDEN_ELEMENTS = ['script', 'iframe', 'object', 'embed', 'style', 'link', 'meta', 'base', 'form', 'img', 'video',
  'audio', 'source', 'frame', 'frameset', 'applet', 'template', 'textarea', 'button', 'select', 'foreignobject', 'use',
  'image', 'animate', 'set', 'maction', 'details', 'body', 'html', 'noscript'];
const URL_ATTRIBUTES = ['href', 'src', 'action', 'formaction', 'xlink:href', 'data', 'srcdoc', 'background', 'poster'];

/** Structural proof that nothing in `html` can run or load anything. */
function expectInert(html: string, source: string): void {
  for (const { name, attributes } of elementsOf(html)) {
    expect(FORBIDDEN_ELEMENTS, `element <${name}> from ${JSON.stringify(source)}`).to.not.include(name.toLowerCase());
    for (const [attribute, value] of Object.entries(attributes)) {
      const lower = attribute.toLowerCase();
      expect(value, `javascript: in ${attribute} from ${JSON.stringify(source)}`).to.not.match(/^\s*(javascript|vbscript|data):/i);
      expect(lower.startsWith('on'), `handler ${attribute} from ${JSON.stringify(source)}`).to.equal(false);
      if (lower === 'id') expect.fail(`id attribute from ${JSON.stringify(source)}`);
      if (URL_ATTRIBUTES.includes(lower)) {
        expect(lower, `URL attribute ${attribute} on <${name}> from ${JSON.stringify(source)}`).to.equal('href');
        // Resolve the URL as a browser would on the app's own page: it must stay http(s) or
        // mailto, and relative URLs must stay on the app's host.
        const resolved = new URL(value, 'https://app.invalid/worksheets/1');
        expect(['https:', 'http:', 'mailto:'], `href ${value} from ${JSON.stringify(source)}`).to.include(resolved.protocol);
        if (!/^\s*(https?:|mailto:)/i.test(value)) {
          expect(resolved.host, `relative href ${value} from ${JSON.stringify(source)}`).to.equal('app.invalid');
        }
      }
      if (lower === 'style') {
        expect(/url\s*\(|expression\s*\(|javascript:|@import/i.test(value), `style ${value} from ${JSON.stringify(source)}`).to.equal(false);
      }
      if (lower === 'class') {
        expect(/(^|\s)(mat|mdc|cdk)-/.test(value), `class ${value} from ${JSON.stringify(source)}`).to.equal(false);
      }
    }
  }
  expect(html).to.not.match(/[\uE000\uE001]/);
}

describe('renderNote: Markdown and math', () => {
  it('renders Markdown: headings, emphasis, lists, tables, code and safe links', () => {
    const html = renderNote(
      '## Gauge R&R note\n\nThe *repeatability* is **fine**.\n\n- first\n- second\n\n| lot | n |\n|:--|--:|\n| A | 10 |\n\n' +
        '`code` and [the handbook](https://www.itl.nist.gov/div898/handbook/) and <sub>2</sub>',
    );
    expect(html).to.contain('<h2>Gauge R&amp;R note</h2>');
    expect(html).to.contain('<em>repeatability</em>');
    expect(html).to.contain('<strong>fine</strong>');
    expect(html).to.contain('<li>second</li>');
    expect(html).to.contain('<th align="left">lot</th>');
    expect(html).to.contain('<code>code</code>');
    expect(html).to.contain('<a href="https://www.itl.nist.gov/div898/handbook/" rel="noopener noreferrer nofollow">the handbook</a>');
    expect(html).to.contain('<sub>2</sub>');
  });

  it('renders $…$ and $$…$$ with KaTeX, the same markup KaTeX gives on its own', () => {
    const inline = renderNote('Variance $s^2 = \\frac{1}{n-1}\\sum (x_i - \\bar x)^2$ here.');
    const expected = katex.renderToString('s^2 = \\frac{1}{n-1}\\sum (x_i - \\bar x)^2', {
      throwOnError: false,
      trust: false,
      strict: 'ignore',
      output: 'htmlAndMathml',
      maxSize: 20,
      maxExpand: 500,
      errorColor: '#b00020',
    });
    // The sanitizer keeps KaTeX's markup as KaTeX wrote it (up to attribute quoting and self-closing tags).
    const normalise = (html: string) =>
      elementsOf(html).map((e) => {
        const attributes = { ...e.attributes };
        if (attributes.style) attributes.style = attributes.style.replace(/;$/, '');
        return `${e.name}${JSON.stringify(attributes)}`;
      });
    const start = inline.indexOf('<span class="katex">');
    const end = inline.lastIndexOf(' here.');
    expect(normalise(inline.slice(start, end))).to.deep.equal(normalise(expected));
    expect(inline).to.contain('<annotation encoding="application/x-tex">s^2 = \\frac{1}{n-1}\\sum (x_i - \\bar x)^2</annotation>');

    const display = renderNote('$$\n\\chi^2 = \\frac{(n-1)s^2}{\\sigma_0^2}\n$$');
    expect(display).to.contain('<div class="note-math-block"><span class="katex-display">');
    expect(display).to.contain('<math xmlns="http://www.w3.org/1998/Math/MathML" display="block">');
    expect(display).to.match(/<svg xmlns="http:\/\/www.w3.org\/2000\/svg"|<span class="frac-line"/);
  });

  it('keeps the SVG KaTeX draws (square roots, stretchy arrows)', () => {
    const html = renderNote('$\\sqrt{x} \\xrightarrow{f} \\overrightarrow{AB}$');
    const svg = elementsOf(html).filter((e) => e.name === 'svg');
    expect(svg.length).to.be.greaterThan(0);
    expect(Object.keys(svg[0].attributes)).to.include.members(['width', 'height', 'viewBox', 'preserveAspectRatio']);
    expect(elementsOf(html).some((e) => e.name === 'path' && e.attributes.d.length > 10)).to.equal(true);
  });

  it('leaves dollar amounts, escaped dollars and code alone', () => {
    expect(renderNote('The gauge costs $5 and the fixture $10.')).to.equal('<p>The gauge costs $5 and the fixture $10.</p>\n');
    expect(renderNote('Escaped \\$x\\$ stays.')).to.equal('<p>Escaped $x$ stays.</p>\n');
    expect(renderNote('Code `$x$` stays.')).to.equal('<p>Code <code>$x$</code> stays.</p>\n');
    expect(renderNote('```\n$$x$$\n```')).to.equal('<pre><code>$$x$$\n</code></pre>\n');
  });

  it('shows a TeX error in place instead of failing', () => {
    const html = renderNote('Broken $\\frac{1}{$ and unknown $\\notacommand$.');
    expect(html).to.contain('<p>Broken ');
    expect(html).to.contain('\\notacommand');
    expect(html).to.match(/color:#b00020|katex-error/);
  });

  it('is deterministic', () => {
    const note = '# Note\n\n$\\sigma \\le 0.5\\,\\mu m$ with 95 % confidence.';
    expect(renderNote(note)).to.equal(renderNote(note));
  });

  it('refuses a note over the length limit', () => {
    expect(() => renderNote('x'.repeat(101), { maxLength: 100 })).to.throw(NoteTooLongError, 'limit is 100');
    expect(() => renderNote('x'.repeat(100_001))).to.throw(NoteTooLongError);
  });
});

describe('renderNote: hostile notes', () => {
  for (const source of HOSTILE) {
    it(`neutralises ${JSON.stringify(source).slice(0, 90)}`, () => {
      const html = renderNote(source);
      expectInert(html, source);
      expect(html).to.not.match(/<script/i);
    });
  }

  it('keeps harmless text of hostile notes readable', () => {
    expect(renderNote('<a href="javascript:alert(1)">plain</a>')).to.contain('plain');
    expect(renderNote('<a href="javascript:alert(1)">plain</a>')).to.not.contain('href');
    expect(renderNote('[markdown link](javascript:alert(1))')).to.not.contain('href');
    expect(renderNote('$\\href{javascript:alert(1)}{click me}$')).to.not.match(/<a\b/);
    expect(renderNote('![alt with $x$ math](http://xss.invalid/a.png)')).to.equal('<p>alt with $x$ math</p>\n');
    expect(renderNote('<img src="http://xss.invalid/a.png" alt="raw">')).to.not.contain('img');
  });

  it('neutralises random mixtures of hostile fragments (fast-check)', function () {
    this.timeout(120_000);
    const fragment = fc.constantFrom(...HOSTILE, '$x$', '$$y$$', '**b**', '\n\n', '<', '>', '"', "'", '`', '[', ']', '(', ')',
      'javascript:', '&#', ';', '\\', '{', '}', 'onerror=', '<a href=', '<img ', '<svg', '<math>', '</');
    fc.assert(
      fc.property(fc.array(fragment, { minLength: 1, maxLength: 12 }), (parts) => {
        const source = parts.join('');
        expectInert(renderNote(source), source);
      }),
      { numRuns: 400 },
    );
  });

  it('runs nothing and loads nothing in a real browser (Chromium, no CSP), even when every link is clicked', async function () {
    this.timeout(120_000);
    if (!existsSync(chromiumPath)) {
      console.log(`      skipped: no Chromium at ${chromiumPath}`);
      this.skip();
    }
    const browser = await launchChromium();
    try {
      const context = await browser.newContext();
      const requests: string[] = [];
      // Nothing may be fetched at all; every attempt is recorded and refused.
      await context.route('**/*', async (route) => {
        requests.push(route.request().url());
        await route.abort('blockedbyclient');
      });
      // Any write to window.__pwned, in this document or one it navigates to, is reported here.
      const ran: string[] = [];
      await context.exposeBinding('__reportRun', (_source, value: unknown) => {
        ran.push(String(value));
      });
      await context.addInitScript({
        content: `Object.defineProperty(window, '__pwned', { configurable: false, set(v) { window.__reportRun(v); }, get() { return undefined; } });`,
      });
      const page = await context.newPage();
      const dialogs: string[] = [];
      page.on('dialog', async (dialog) => {
        dialogs.push(dialog.message());
        await dialog.dismiss();
      });
      const body = HOSTILE.map((source, i) => `<section data-case="${i}">${renderNote(source)}</section>`).join('\n');
      await page.setContent(`<!doctype html><html><head><meta charset="utf-8"></head><body>${body}</body></html>`);
      await page.waitForTimeout(300);
      // Click, hover and focus everything a reader could touch.
      const count = await page.locator('a, input, span, p').count();
      for (let i = 0; i < Math.min(count, 400); i++) {
        const element = page.locator('a, input, span, p').nth(i);
        await element.hover({ timeout: 500, force: true }).catch(() => undefined);
      }
      // Clicking an http(s) link would only navigate away (and be refused); every other link is
      // clicked, since that is where a javascript: URL would run.
      const others = page.locator('a:not([href^="https://"]):not([href^="http://"]):not([href^="mailto:"])');
      const links = await others.count();
      for (let i = 0; i < links; i++) {
        await others.nth(i).click({ timeout: 1000, force: true }).catch(() => undefined);
      }
      await page.waitForTimeout(300);
      expect(ran, 'payloads that ran').to.deep.equal([]);
      expect(page.url(), 'the page navigated').to.equal('about:blank');
      expect(dialogs, 'dialogs opened').to.deep.equal([]);
      // Links to https://example.org are fine to attempt (and refused above); nothing else.
      expect(requests.filter((url) => !url.startsWith('https://example.org')), 'requests').to.deep.equal([]);
      await context.close();
    } finally {
      await browser.close();
    }
  });
});
