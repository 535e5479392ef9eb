/**
 * Text from the data in HTML and SVG (pages, pictures): the five markup
 * characters as entities, so that nothing from the data becomes markup or
 * script, and every character XML 1.0 forbids (C0 controls other than tab,
 * line feed and carriage return; U+FFFE, U+FFFF; unpaired surrogates) shown
 * as a visible escape instead, so that a page or picture stays well-formed
 * and every viewer shows it; DEL and the C1 controls, allowed but invisible,
 * likewise (W3C, Extensible Markup Language 1.0, §2.2 Characters).
 */
import { visibleEscape } from './terminal.js';

// eslint-disable-next-line no-control-regex
const NOT_XML = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\ufffe\uffff]|[\ud800-\udbff](?![\udc00-\udfff])|(?<![\ud800-\udbff])[\udc00-\udfff]/g;

export function escapeXml(text: string): string {
  return text
    .replace(NOT_XML, visibleEscape)
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/"/g, '&quot;')
    .replace(/'/g, '&#39;');
}
