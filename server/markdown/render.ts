import { createRequire } from 'node:module';
import type MarkdownIt from 'markdown-it';
import type sanitizeHtml from 'sanitize-html';

/**
 * Markdown for findings, comments and wiki pages, rendered on the server so there is one renderer and
 * the browser only ever receives sanitised HTML.
 *
 * Two layers: markdown-it with `html: false` never passes raw HTML through (it is shown as text), and
 * its link validator drops javascript:, vbscript:, file: and most data: URLs; sanitize-html then keeps
 * only an allowlist of tags and attributes and only http(s)/mailto links, whatever the first layer did.
 * Every link gets rel="noopener noreferrer". Images are not kept: the page must not load anything from
 * elsewhere (and the content security policy would block it anyway); the alt text stays.
 */
// Both libraries are loaded on the first page rendered, not at start: with their dependencies (entities,
// htmlparser2, postcss…) they hold several MB of a server that may render nothing for hours
// (bench/server-memory.ts). `require` keeps these functions synchronous; they run inside transactions.
const require = createRequire(import.meta.url);
let markdownIt: InstanceType<typeof MarkdownIt> | null = null;
let sanitizer: typeof sanitizeHtml | null = null;
const md = (): InstanceType<typeof MarkdownIt> => {
  if (!markdownIt) {
    const MarkdownItClass = require('markdown-it') as typeof MarkdownIt;
    markdownIt = new MarkdownItClass({ html: false, linkify: true, typographer: false, breaks: false });
    markdownIt.disable(['image']);
  }
  return markdownIt;
};
const sanitize = (dirty: string, options: sanitizeHtml.IOptions): string => (sanitizer ??= require('sanitize-html') as typeof sanitizeHtml)(dirty, options);

const ALLOWED_TAGS = [
  'p',
  'br',
  'hr',
  'h1',
  'h2',
  'h3',
  'h4',
  'h5',
  'h6',
  'blockquote',
  'pre',
  'code',
  'em',
  'strong',
  's',
  'ul',
  'ol',
  'li',
  'a',
  'table',
  'thead',
  'tbody',
  'tr',
  'th',
  'td',
  'sup',
  'sub',
];

const SANITIZE: sanitizeHtml.IOptions = {
  allowedTags: ALLOWED_TAGS,
  allowedAttributes: { a: ['href', 'title', 'rel'], ol: ['start'], th: ['style'], td: ['style'] },
  allowedStyles: { th: { 'text-align': [/^(left|right|center)$/] }, td: { 'text-align': [/^(left|right|center)$/] } },
  allowedSchemes: ['http', 'https', 'mailto'],
  allowedSchemesAppliedToAttributes: ['href'],
  allowProtocolRelative: false,
  disallowedTagsMode: 'escape',
  transformTags: {
    a: (tagName, attribs) => ({ tagName, attribs: { ...attribs, rel: 'noopener noreferrer' } }),
  },
};

/** Markdown → sanitised HTML. */
export function renderMarkdown(source: string): string {
  return sanitize(md().render(source), SANITIZE);
}

/** Plain text of the Markdown (for search and e-mail excerpts): rendered, then every tag dropped. */
export function markdownToText(source: string): string {
  return sanitize(md().render(source), { allowedTags: [], allowedAttributes: {} })
    .replace(/&amp;/g, '&')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&#39;/g, "'")
    .replace(/\s+/g, ' ')
    .trim();
}

/** SVG tags and attributes a plot drawn by a charting library uses; everything else (scripts, handlers, foreign objects, links) goes. */
const SVG_TAGS = [
  'svg',
  'g',
  'path',
  'line',
  'polyline',
  'polygon',
  'rect',
  'circle',
  'ellipse',
  'text',
  'tspan',
  'title',
  'desc',
  'defs',
  'clippath',
  'clipPath',
  'style',
];
const SVG_ATTRS = [
  'viewbox',
  'viewBox',
  'width',
  'height',
  'x',
  'y',
  'x1',
  'x2',
  'y1',
  'y2',
  'cx',
  'cy',
  'r',
  'rx',
  'ry',
  'd',
  'points',
  'transform',
  'fill',
  'fill-opacity',
  'stroke',
  'stroke-width',
  'stroke-opacity',
  'stroke-dasharray',
  'stroke-linecap',
  'stroke-linejoin',
  'opacity',
  'font-family',
  'font-size',
  'font-weight',
  'font-variant',
  'text-anchor',
  'dominant-baseline',
  'dy',
  'dx',
  'class',
  'id',
  'clip-path',
  'xmlns',
  'aria-label',
  'aria-hidden',
  'role',
  'paint-order',
  'shape-rendering',
];

/**
 * Keeps a plot's SVG drawable and inert. It is shown through <img src="data:…">, where scripts never run,
 * but it is also written into export archives, so it is cleaned here too.
 */
export function sanitizeSvg(svg: string): string {
  return sanitize(svg, {
    allowedTags: SVG_TAGS,
    allowedAttributes: { '*': SVG_ATTRS },
    allowedSchemes: [],
    parser: { lowerCaseTags: false, lowerCaseAttributeNames: false },
    disallowedTagsMode: 'discard',
    // A <style> inside a plot may carry url(…) or @import; drop it whole if it does.
    exclusiveFilter: (frame) => frame.tag === 'style' && /url\(|@import|expression/i.test(frame.text),
    allowVulnerableTags: true,
  });
}
