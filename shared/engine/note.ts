// Notes: Markdown with TeX math between steps of a worksheet, rendered to HTML that is safe to
// insert into the page (a reviewer or a customer with a published link reads what an analyst
// wrote).
//
// Pipeline:
// 1. Private-use characters U+E000/U+E001 are removed from the input; they mark math.
// 2. marked turns Markdown into HTML. A marked extension takes `$$…$$` (display) and `$…$`
//    (inline) out of the text before Markdown can touch it and leaves a marker in its place.
//    Inline `$` opens math only when not followed by a space, and closes only when not preceded
//    by a space nor followed by a digit, so "costs $5 and $10" stays text (common practice, as in
//    Pandoc). `\$` is a literal dollar. Code spans and code blocks are never math.
// 3. sanitize-html cleans that HTML with a strict allow-list (formatting, lists, tables, code,
//    links with http, https or mailto only; no class or style from the author; no images: a
//    Markdown image shows its alt text, an HTML <img> is dropped). Markers are replaced in text nodes only (never inside an attribute) by:
// 4. KaTeX's rendering of the math, with trust off (no \href, \url, \includegraphics, \html…),
//    errors drawn in place instead of thrown, macro expansion and sizes capped, each cleaned by
//    a second allow-list that keeps exactly KaTeX's markup: spans with KaTeX classes and a few
//    length and colour styles, MathML elements and attributes (no href), and the SVG path and
//    line elements KaTeX draws with.
// 5. The whole result passes the second allow-list once more, as a last guard.
// No scripts, event handlers, javascript: or data: URLs, iframes, forms, style elements or
// author-written style attributes survive any of these steps. Pure and deterministic.
import katex from 'katex';
import { Marked, type TokenizerAndRendererExtension } from 'marked';
import sanitizeHtml from 'sanitize-html';

export interface RenderNoteOptions {
  /** Longest note accepted, in characters (default 100,000). */
  maxLength?: number;
}

export class NoteTooLongError extends Error {
  override readonly name = 'NoteTooLongError';
}

export const DEFAULT_NOTE_MAX_LENGTH = 100_000;

const MARK_OPEN = '\uE000';
const MARK_CLOSE = '\uE001';
const MARKER = /\uE000(\d+)\uE001/g;
const MARK_CHARS = /[\uE000\uE001]/g;

interface MathPiece {
  tex: string;
  display: boolean;
}

/** Math pieces of the note being rendered (rendering is synchronous, one note at a time). */
let pieces: MathPiece[] = [];

function marker(tex: string, display: boolean): string {
  pieces.push({ tex, display });
  return `${MARK_OPEN}${pieces.length - 1}${MARK_CLOSE}`;
}

const INLINE_DISPLAY = /^\$\$(?!\$)([\s\S]+?)\$\$/;
const INLINE_MATH = /^\$(?![\s$])((?:\\[\s\S]|[^\\$])*?[^\\\s$]|[^\\\s$])\$(?!\d)/;
const BLOCK_MATH = /^ {0,3}\$\$([\s\S]+?)\$\$[ \t]*(?:\n+|$)/;

const mathExtensions: TokenizerAndRendererExtension[] = [
  {
    name: 'noteMathBlock',
    level: 'block',
    start(src: string) {
      return /^ {0,3}\$\$/m.exec(src)?.index;
    },
    tokenizer(src: string) {
      const match = BLOCK_MATH.exec(src);
      if (match) return { type: 'noteMathBlock', raw: match[0], text: match[1].trim() };
      return undefined;
    },
    renderer(token) {
      return `<div class="note-math-block">${marker(String(token.text), true)}</div>\n`;
    },
  },
  {
    name: 'noteMathInline',
    level: 'inline',
    start(src: string) {
      const at = src.indexOf('$');
      return at < 0 ? undefined : at;
    },
    tokenizer(src: string) {
      const display = INLINE_DISPLAY.exec(src);
      if (display) return { type: 'noteMathInline', raw: display[0], text: display[1].trim(), display: true };
      const inline = INLINE_MATH.exec(src);
      if (inline) return { type: 'noteMathInline', raw: inline[0], text: inline[1], display: false };
      return undefined;
    },
    renderer(token) {
      return marker(String(token.text), Boolean(token.display));
    },
  },
];

const markdown = new Marked({ gfm: true, breaks: false, async: false });
markdown.use({
  extensions: mathExtensions,
  renderer: {
    // Images would load from anywhere (and tell a third party who reads a published worksheet):
    // a Markdown image shows its alt text instead.
    image({ text }) {
      return escapeText(text);
    },
  },
});

function escapeText(text: string): string {
  return text.replace(MARK_CHARS, '').replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

// --- Allow-list for what the author writes ---------------------------------------------------

const URL_SCHEMES = ['http', 'https', 'mailto'];

const authorPolicy: sanitizeHtml.IOptions = {
  allowedTags: [
    'p', 'br', 'hr', 'h1', 'h2', 'h3', 'h4', 'h5', 'h6', 'strong', 'em', 'b', 'i', 'u', 's', 'del', 'ins',
    'mark', 'sub', 'sup', 'small', 'abbr', 'code', 'pre', 'kbd', 'samp', 'var', 'blockquote', 'q', 'ul', 'ol',
    'li', 'dl', 'dt', 'dd', 'table', 'thead', 'tbody', 'tfoot', 'tr', 'th', 'td', 'caption', 'a', 'span', 'div',
    'input',
  ],
  allowedAttributes: {
    a: ['href', 'title', 'rel'],
    abbr: ['title'],
    th: ['align', 'colspan', 'rowspan'],
    td: ['align', 'colspan', 'rowspan'],
    ol: ['start'],
    code: ['class'],
    div: ['class'],
    // GitHub-flavoured task lists: marked writes disabled checkboxes.
    input: ['type', 'checked', 'disabled'],
  },
  allowedClasses: {
    code: ['language-*'],
    div: ['note-math-block'],
  },
  allowedSchemes: URL_SCHEMES,
  allowedSchemesByTag: {},
  allowedSchemesAppliedToAttributes: ['href', 'src', 'cite', 'action', 'formaction'],
  allowProtocolRelative: false,
  disallowedTagsMode: 'discard',
  // Content of these is dropped with the element, not shown as text.
  nonTextTags: ['script', 'style', 'textarea', 'option', 'noscript', 'iframe', 'object', 'embed', 'title', 'template', 'svg', 'math'],
  transformTags: {
    '*': (tagName, attribs) => ({ tagName, attribs: withoutMarkers(attribs) }),
    a: (tagName, attribs) => ({ tagName, attribs: { ...withoutMarkers(attribs), rel: 'noopener noreferrer nofollow' } }),
    input: (tagName, attribs) =>
      attribs.type === 'checkbox'
        ? { tagName, attribs: { type: 'checkbox', disabled: '', ...(attribs.checked !== undefined ? { checked: '' } : {}) } }
        : { tagName: 'span', attribs: {} },
  },
  textFilter: (text) => text.replace(MARKER, (_all, index: string) => renderMath(Number(index))),
  parser: { lowerCaseAttributeNames: true },
};

function withoutMarkers(attribs: sanitizeHtml.Attributes): sanitizeHtml.Attributes {
  const clean: sanitizeHtml.Attributes = {};
  for (const [name, value] of Object.entries(attribs)) clean[name] = value.replace(MARKER, '').replace(MARK_CHARS, '');
  return clean;
}

// --- Allow-list for KaTeX's output ------------------------------------------------------------

const MATHML_TAGS = [
  'math', 'semantics', 'annotation', 'mrow', 'mi', 'mn', 'mo', 'ms', 'mtext', 'mspace', 'msup', 'msub', 'msubsup',
  'mfrac', 'msqrt', 'mroot', 'mover', 'munder', 'munderover', 'mstyle', 'mtable', 'mtr', 'mtd', 'mlabeledtr',
  'menclose', 'mpadded', 'mphantom', 'merror',
];
const MATHML_ATTRIBUTES = [
  'mathvariant', 'stretchy', 'fence', 'separator', 'lspace', 'rspace', 'accent', 'accentunder', 'displaystyle',
  'scriptlevel', 'columnalign', 'columnspacing', 'rowspacing', 'columnlines', 'rowlines', 'rowalign', 'frame',
  'framespacing', 'width', 'height', 'depth', 'voffset', 'notation', 'minsize', 'maxsize', 'movablelimits',
  'symmetric', 'linethickness', 'largeop', 'mathcolor', 'mathbackground', 'mathsize', 'form', 'side', 'align',
  'equalrows', 'equalcolumns', 'columnwidth', 'linebreak', 'class', 'style',
];
const LENGTH = [/^[-+]?(\d+\.?\d*|\.\d+)(em|ex|px|pt|%)?$/, /^calc\([-+\d.%emxpt ]+\)$/];
const LENGTHS = [/^([-+]?(\d+\.?\d*|\.\d+)(em|ex|px|pt|%)?\s*){1,4}$/];
const BORDER_STYLE = [/^(solid|dashed|dotted|double|none)$/];
const COLOR = [/^#[0-9a-fA-F]{3,8}$/, /^rgba?\(\s*[\d.]+%?\s*,\s*[\d.]+%?\s*,\s*[\d.]+%?\s*(,\s*[\d.]+\s*)?\)$/, /^[a-zA-Z]{3,20}$/];

const mathPolicy: sanitizeHtml.IOptions = {
  allowedTags: [...(authorPolicy.allowedTags as string[]), ...MATHML_TAGS, 'svg', 'path', 'line', 'rect'],
  allowedAttributes: {
    ...(authorPolicy.allowedAttributes as Record<string, string[]>),
    span: ['class', 'style', 'aria-hidden', 'title'],
    math: ['xmlns', 'display', ...MATHML_ATTRIBUTES],
    annotation: ['encoding'],
    ...Object.fromEntries(MATHML_TAGS.filter((t) => t !== 'math' && t !== 'annotation').map((t) => [t, MATHML_ATTRIBUTES])),
    svg: ['xmlns', 'width', 'height', 'viewBox', 'preserveAspectRatio', 'style'],
    path: ['d'],
    line: ['x1', 'y1', 'x2', 'y2', 'stroke-width'],
    rect: ['x', 'y', 'width', 'height'],
  },
  allowedClasses: {
    ...(authorPolicy.allowedClasses as Record<string, string[]>),
    // KaTeX's class names (0.19 prefixes most with "katex-").
    span: [
      'katex*', 'm*', 'vlist*', 'pstrut', 'reset-size*', 'size*', 'nulldelimiter', 'frac-line', 'sqrt', 'svg-align',
      'hide-tail', 'text', 'delim*', 'col-align-*', 'arraycolsep', 'accent-body', 'brace-*', 'boxpad', 'fbox',
      'fcolorbox', 'x-arrow*', 'rlap', 'llap', 'clap', 'nobreak', 'allowbreak', 'root', 'op-symbol', 'small-op',
      'large-op', 'op-limits', 'tag', 'eqn-num', 'newline', 'overline', 'underline', 'stretchy', 'cancel*', 'overlay',
      'strut', 'base', 'sizing', 'fontsize-ensurer', 'mult', 'rule', 'inner', 'fix', 'vbox', 'thinbox', 'halfarrow-*',
      'amsrm', 'textrm', 'textit', 'textbf', 'textsf', 'texttt', 'boldsymbol', 'enclosing', 'angl', 'anglpad',
      'underbrace*', 'overbrace*', 'hdashline', 'hline', 'vertical-separator', 'leftmost', 'rightmost', 'smash',
      'overline*', 'underline*', 'colorbox', 'accent*',
    ],
  },
  allowedStyles: {
    '*': {
      height: LENGTH,
      width: LENGTH,
      'min-width': LENGTH,
      'max-width': LENGTH,
      top: LENGTH,
      bottom: LENGTH,
      left: LENGTH,
      right: LENGTH,
      'vertical-align': LENGTH,
      'margin-left': LENGTH,
      'margin-right': LENGTH,
      'margin-top': LENGTH,
      'margin-bottom': LENGTH,
      'padding-left': LENGTH,
      'padding-right': LENGTH,
      'padding-top': LENGTH,
      'padding-bottom': LENGTH,
      'border-width': LENGTH,
      'border-top-width': LENGTH,
      'border-bottom-width': LENGTH,
      'border-right-width': LENGTH,
      'border-left-width': LENGTH,
      'border-style': BORDER_STYLE,
      'border-right-style': BORDER_STYLE,
      'border-left-style': BORDER_STYLE,
      'border-top-style': BORDER_STYLE,
      'border-bottom-style': BORDER_STYLE,
      'border-color': COLOR,
      border: [/^[-+]?(\d+\.?\d*|\.\d+)(em|px|pt)\s+(solid|dashed|dotted|double)\s+(#[0-9a-fA-F]{3,8}|[a-zA-Z]{3,20})$/],
      margin: LENGTHS,
      padding: LENGTHS,
      position: [/^relative$/],
      'text-shadow': [/^([-+]?(\d+\.?\d*|\.\d+)(em|px)\s*){2,3}$/],
      color: COLOR,
      'background-color': COLOR,
    },
  },
  allowedSchemes: URL_SCHEMES,
  allowedSchemesByTag: {},
  allowedSchemesAppliedToAttributes: ['href', 'src', 'cite', 'action', 'formaction', 'xlink:href'],
  allowProtocolRelative: false,
  disallowedTagsMode: 'discard',
  nonTextTags: ['script', 'style', 'textarea', 'option', 'noscript', 'iframe', 'object', 'embed', 'title', 'template'],
  parser: { lowerCaseAttributeNames: false },
};

const KATEX_OPTIONS: katex.KatexOptions = {
  throwOnError: false,
  trust: false,
  strict: 'ignore',
  output: 'htmlAndMathml',
  // Caps against notes that try to exhaust the renderer or cover the page.
  maxSize: 20,
  maxExpand: 500,
  errorColor: '#b00020',
};

function renderMath(index: number): string {
  const piece = pieces[index];
  if (!piece) return '';
  const html = katex.renderToString(piece.tex, { ...KATEX_OPTIONS, displayMode: piece.display });
  return sanitizeHtml(html, mathPolicy);
}

/**
 * Renders a note (Markdown with `$…$` and `$$…$$` TeX math) to sanitized HTML. Throws
 * NoteTooLongError above `maxLength` characters.
 */
export function renderNote(source: string, options: RenderNoteOptions = {}): string {
  const maxLength = options.maxLength ?? DEFAULT_NOTE_MAX_LENGTH;
  if (source.length > maxLength) {
    throw new NoteTooLongError(`The note is ${source.length} characters long; the limit is ${maxLength}.`);
  }
  pieces = [];
  try {
    const html = markdown.parse(source.replace(MARK_CHARS, '')) as string;
    const safe = sanitizeHtml(html, authorPolicy);
    return sanitizeHtml(safe, mathPolicy);
  } finally {
    pieces = [];
  }
}
