// Turning schema failures of untrusted JSON into short, located problem sentences.
import type { z } from 'zod';

/** One sentence per issue, each starting with where it is, e.g. `envelope.manifest.results[0].value: ...`. */
export function describeIssues(error: z.ZodError, root: string): string[] {
  return error.issues.map((issue) => `${formatPath(root, issue.path)}: ${issue.message}`);
}

/** `root.a[0].b` for the path `['a', 0, 'b']`. */
export function formatPath(root: string, path: readonly PropertyKey[]): string {
  let text = root;
  for (const step of path) {
    text += typeof step === 'number' ? `[${step}]` : `.${String(step)}`;
  }
  return text;
}
