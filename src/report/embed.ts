// Data carried inside a report as JSON script elements, which browsers never run, and reading it back.

const SCRIPT_CLOSE = '</script>';

/** `<` written as \u003c keeps the text valid JSON and unable to close its script element. */
export function jsonScript(open: string, json: string): string {
  return `${open}${json.replace(/</g, '\\u003c')}${SCRIPT_CLOSE}`;
}

/** The raw JSON texts of every script element opened exactly with `open`, in order. */
export function jsonScriptTexts(html: string, open: string): string[] {
  const found: string[] = [];
  let from = 0;
  for (;;) {
    const start = html.indexOf(open, from);
    if (start < 0) return found;
    const end = html.indexOf(SCRIPT_CLOSE, start + open.length);
    if (end < 0) return found;
    found.push(html.slice(start + open.length, end));
    from = end + SCRIPT_CLOSE.length;
  }
}

export const STUDY_SOURCE_SCRIPT = '<script type="application/json" id="kvarbook-study-source">';

/** The study source a report carries, so that a checker holding only the report can re-run it. */
export function embeddedStudySource(html: string): string | undefined {
  const [text] = jsonScriptTexts(html, STUDY_SOURCE_SCRIPT);
  if (text === undefined) return undefined;
  try {
    const value: unknown = JSON.parse(text);
    return typeof value === 'string' ? value : undefined;
  } catch {
    return undefined;
  }
}
