// A PDF in hand against a fresh print of the same report: the same bytes, or the differences a reader would see.
import { readPdf, type ReadPdf } from './attachments.ts';

export interface PrintComparison {
  identical: boolean;
  /** Sentences, most telling first: the printing browser, the pages, the attachments, the title. */
  differences: string[];
}

export async function comparePrints(inHand: { bytes: Uint8Array; read: ReadPdf }, reprint: Uint8Array): Promise<PrintComparison> {
  if (Buffer.from(inHand.bytes).equals(Buffer.from(reprint))) return { identical: true, differences: [] };
  const fresh = await readPdf(reprint);
  const held = inHand.read;
  const differences: string[] = [];
  if (held.producer !== fresh.producer) {
    differences.push(
      `it names its producer "${held.producer ?? ''}", while this machine prints as "${fresh.producer ?? ''}": only the same Chromium build prints the same pages`,
    );
  }
  if (held.pageDigests.length !== fresh.pageDigests.length) {
    differences.push(`it has ${held.pageDigests.length} pages, a fresh print ${fresh.pageDigests.length}`);
  } else {
    const changed = held.pageDigests.flatMap((digest, index) => (digest === fresh.pageDigests[index] ? [] : [index + 1]));
    if (changed.length > 0)
      differences.push(`the content of page${changed.length > 1 ? 's' : ''} ${listed(changed.map(String))} differs from a fresh print`);
  }
  const heldNames = held.attachments.map((attachment) => attachment.fileName);
  const freshNames = fresh.attachments.map((attachment) => attachment.fileName);
  if (heldNames.join('\n') !== freshNames.join('\n')) {
    differences.push(`it carries the attachments ${listed(heldNames)}, a fresh print ${listed(freshNames)}`);
  } else {
    const changed = held.attachments.filter(
      (attachment, index) => !Buffer.from(attachment.content).equals(Buffer.from(fresh.attachments[index]!.content)),
    );
    if (changed.length > 0)
      differences.push(
        `the attached ${listed(changed.map((attachment) => attachment.fileName))} differ${changed.length === 1 ? 's' : ''} from a fresh print's`,
      );
  }
  if (held.title !== fresh.title) differences.push(`its title is "${held.title ?? ''}", a fresh print's "${fresh.title ?? ''}"`);
  if (differences.length === 0)
    differences.push('its pages and attachments are those of a fresh print, but other bytes (document information or structure) differ');
  return { identical: false, differences };
}

function listed(items: readonly string[]): string {
  if (items.length === 0) return 'none';
  return items.length === 1 ? items[0]! : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`;
}
