/**
 * Release notes are untrusted Markdown: raw HTML, scripts, event handlers and javascript: URLs must
 * not survive (rehype-sanitize's default schema follows GitHub's sanitisation; the attack strings
 * are the classic XSS vectors, common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { notesToHtml } from '../../src/lib/markdown.ts';

describe('notesToHtml', () => {
  it('renders ordinary Markdown', () => {
    const html = notesToHtml('# Title\n\n*em* and **strong**\n\n- a\n- b\n\n[link](https://example.org/x)');
    expect(html).toContain('<h1>Title</h1>');
    expect(html).toContain('<em>em</em>');
    expect(html).toContain('<strong>strong</strong>');
    expect(html).toMatch(/<ul>\s*<li>a<\/li>/);
    expect(html).toContain('href="https://example.org/x"');
  });

  const attacks: [string, RegExp][] = [
    ['<script>alert(1)</script>', /<script/i],
    ['<img src=x onerror="alert(1)">', /onerror/i],
    ['[x](javascript:alert(1))', /javascript:/i],
    ['<iframe src="https://example.org"></iframe>', /<iframe/i],
    ['<a href="#" onclick="alert(1)">x</a>', /onclick/i],
    ['<style>body{display:none}</style>', /<style/i],
    ['<div>\n<script>alert(1)</script>\n</div>', /<script/i],
    ['![x](javascript:alert(1))', /javascript:/i],
  ];
  for (const [input, bad] of attacks)
    it(`removes ${JSON.stringify(input)}`, () => {
      expect(notesToHtml(`before\n\n${input}\n\nafter`)).not.toMatch(bad);
    });

  it('keeps the text around removed HTML', () => {
    const html = notesToHtml('before <script>x()</script> after');
    expect(html).toContain('before');
    expect(html).toContain('after');
  });
});
