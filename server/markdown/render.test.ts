import { describe, expect, it } from 'vitest';
import { markdownToText, renderMarkdown, sanitizeSvg } from './render';

// Payloads from the OWASP XSS filter evasion cheat sheet (common practice for sanitiser tests).
const PAYLOADS = [
  '<script>alert(1)</script>',
  '<img src=x onerror=alert(1)>',
  '<svg onload=alert(1)>',
  '[click](javascript:alert(1))',
  '[click](JaVaScRiPt:alert(1))',
  '[x](data:text/html;base64,PHNjcmlwdD5hbGVydCgxKTwvc2NyaXB0Pg==)',
  '<a href="javascript:alert(1)">x</a>',
  '<iframe src="https://example.org"></iframe>',
  '![x](https://example.org/x.png" onerror="alert(1))',
  '<div style="background:url(javascript:alert(1))">x</div>',
];

describe('Markdown rendering is safe', () => {
  it('renders ordinary Markdown', () => {
    const html = renderMarkdown('# Uptake\n\nSoft maple took **more** resin than *hard* maple.\n\n- one\n- two\n\n| a | b |\n|---|--:|\n| 1 | 2 |');
    expect(html).toContain('<h1>Uptake</h1>');
    expect(html).toContain('<strong>more</strong>');
    expect(html).toContain('<li>one</li>');
    expect(html).toContain('<td style="text-align:right">2</td>');
  });

  it('marks every link noopener noreferrer and keeps only http(s) and mailto', () => {
    expect(renderMarkdown('[a](https://example.org/x)')).toBe('<p><a href="https://example.org/x" rel="noopener noreferrer">a</a></p>\n');
    expect(renderMarkdown('see https://example.org')).toContain('rel="noopener noreferrer"');
  });

  it('leaves no script, handler, iframe or javascript: URL in the output', () => {
    for (const p of PAYLOADS) {
      const html = renderMarkdown(p);
      // Every real tag left is a harmless one, has no event handler and links only to http(s).
      for (const tag of html.match(/<[a-z][^>]*>/gi) ?? []) {
        expect(tag, p).toMatch(/^<(p|a|em|strong)[\s>]/);
        expect(tag, p).not.toMatch(/\son\w+=|javascript:|data:/i);
      }
    }
  });

  it('gives plain text for search', () => {
    expect(markdownToText('# Title\n\nBody with <b>tags</b> & **bold**')).toBe('Title Body with <b>tags</b> & bold');
  });
});

describe('SVG plots are cleaned', () => {
  it('keeps shapes and text, drops scripts, handlers and links', () => {
    const svg =
      '<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 10 10" onload="alert(1)"><script>alert(1)</script><a href="javascript:alert(1)"><circle cx="5" cy="5" r="2" fill="red" onclick="x()"/></a><text x="1" y="9">WPG %</text><foreignObject><div>x</div></foreignObject></svg>';
    const out = sanitizeSvg(svg);
    expect(out).toContain('viewBox="0 0 10 10"');
    expect(out).toContain('<circle cx="5" cy="5" r="2" fill="red"');
    expect(out).toContain('WPG %');
    expect(out).not.toMatch(/script|onload|onclick|javascript|foreignObject|<a /i);
  });
});
