/**
 * An independent look at HTML that will be put into a page: parsed with htmlparser2 (not with the
 * sanitizer that produced it), every element and attribute is checked for a way to run script or
 * to load something: script-capable elements, event-handler attributes, URLs with a scheme other
 * than http, https or mailto (after decoding entities and dropping the whitespace and control
 * characters browsers ignore), and styles that load or evaluate. Returns the problems found.
 */
import { Parser } from 'htmlparser2';

const forbiddenElements = new Set([
  'script', 'iframe', 'frame', 'frameset', 'object', 'embed', 'applet', 'form', 'button', 'textarea', 'select', 'option',
  'link', 'meta', 'base', 'style', 'template', 'noscript', 'img', 'image', 'video', 'audio', 'source', 'track', 'picture',
  'foreignobject', 'animate', 'animatemotion', 'animatetransform', 'set', 'use', 'portal', 'dialog', 'details', 'marquee', 'xmp', 'plaintext',
]);
const urlAttributes = new Set(['href', 'src', 'action', 'formaction', 'xlink:href', 'srcset', 'background', 'poster', 'data', 'cite', 'longdesc', 'lowsrc', 'dynsrc', 'ping', 'manifest', 'codebase', 'archive', 'usemap']);
const safeSchemes = /^(https?:|mailto:)/i;

/** Entity-decoded, with the characters a browser strips from a URL before reading its scheme removed. */
function normaliseUrl(value: string): string {
  const decoded = value
    .replace(/&#x([0-9a-f]+);?/gi, (_, hex: string) => String.fromCodePoint(parseInt(hex, 16)))
    .replace(/&#(\d+);?/g, (_, dec: string) => String.fromCodePoint(Number(dec)))
    .replace(/&colon;/gi, ':')
    .replace(/&tab;/gi, '\t')
    .replace(/&newline;/gi, '\n');
  // eslint-disable-next-line no-control-regex
  return decoded.replace(/[\u0000-\u0020\u007f-\u009f]/g, '');
}

export function htmlProblems(html: string): string[] {
  const problems: string[] = [];
  if (/<\s*script/i.test(html)) problems.push('the text "<script" occurs');
  const parser = new Parser(
    {
      onopentag(name, attributes) {
        const tag = name.toLowerCase();
        if (forbiddenElements.has(tag)) problems.push(`element <${tag}>`);
        if (tag === 'input' && (attributes.type !== 'checkbox' || attributes.disabled === undefined)) problems.push('an enabled or non-checkbox <input>');
        for (const [rawName, value] of Object.entries(attributes)) {
          const attribute = rawName.toLowerCase();
          if (attribute.startsWith('on')) problems.push(`event handler ${attribute} on <${tag}>`);
          if (attribute === 'srcdoc' || attribute === 'formaction' || attribute === 'autofocus') problems.push(`attribute ${attribute} on <${tag}>`);
          if (urlAttributes.has(attribute)) {
            const url = normaliseUrl(value);
            const hasScheme = /^[a-z][a-z0-9+.-]*:/i.test(url);
            if (hasScheme && !safeSchemes.test(url)) problems.push(`${attribute}="${value.slice(0, 60)}" on <${tag}>`);
            if (url.startsWith('//')) problems.push(`protocol-relative ${attribute} on <${tag}>`);
          }
          if (attribute === 'style' && /url\s*\(|expression\s*\(|javascript:|@import|behavior\s*:|-moz-binding/i.test(normaliseUrl(value))) {
            problems.push(`style that loads or evaluates on <${tag}>: ${value.slice(0, 80)}`);
          }
        }
      },
    },
    { decodeEntities: true, lowerCaseTags: true, lowerCaseAttributeNames: true, recognizeSelfClosing: true },
  );
  parser.write(html);
  parser.end();
  return problems;
}
