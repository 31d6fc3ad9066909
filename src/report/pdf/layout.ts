// Page geometry and the running header/footer templates of printed reports.
import { escapeHtml } from '../escape.ts';

/** Page margins; header and footer are drawn inside the top and bottom margins. */
export const pageLayout = {
  margin: { top: '22mm', bottom: '20mm', left: '18mm', right: '18mm' },
} as const;

// Chromium renders these templates in their own document with no inherited styles (font size 0 by
// default), so everything needed is inline. Horizontal padding matches the side margins so the
// running lines align with the body text.
const runningStyle = [
  'box-sizing: border-box',
  'width: 100%',
  'padding: 0 18mm',
  "font-family: 'Liberation Sans', 'Helvetica Neue', Arial, sans-serif",
  'font-size: 8pt',
  'color: #3b3b3b',
  'display: flex',
  'justify-content: space-between',
  'align-items: baseline',
].join('; ');

export function headerTemplate(headerText: string, title: string): string {
  return (
    `<div style="${runningStyle}; margin-top: 7mm">` +
    `<span style="white-space: pre; font-weight: bold">${escapeHtml(headerText)}</span>` +
    `<span style="overflow: hidden; text-overflow: ellipsis; white-space: nowrap; max-width: 60%">${escapeHtml(title)}</span>` +
    `</div>`
  );
}

export function footerTemplate(): string {
  return (
    `<div style="${runningStyle}; justify-content: center; margin-bottom: 6mm">` +
    `<span>page <span class="pageNumber"></span> of <span class="totalPages"></span></span>` +
    `</div>`
  );
}
