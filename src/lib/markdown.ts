/**
 * Release notes: Markdown → HTML through remark → remark-rehype → rehype-sanitize → rehype-stringify.
 * remark-rehype drops raw HTML (allowDangerousHtml is off) and rehype-sanitize's default schema
 * (GitHub's) removes scripts, event handlers and javascript: URLs on what remains.
 */
import { remark } from 'remark';
import remarkRehype from 'remark-rehype';
import rehypeSanitize from 'rehype-sanitize';
import rehypeStringify from 'rehype-stringify';

const processor = remark().use(remarkRehype).use(rehypeSanitize).use(rehypeStringify);

export function notesToHtml(markdown: string): string {
  return String(processor.processSync(markdown));
}
