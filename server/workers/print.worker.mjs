// Worker-thread entry for printing exhibits (PDF): registers tsx, then loads the TypeScript task.
// Drawing and embedding fonts takes about half a second a page, kept off the event loop.
import { register } from 'tsx/esm/api';

register();
const { figuresPdf } = await import('../services/exhibits/pdf.ts');

export default async function task({ items, meta }) {
  const pdf = await figuresPdf(items, meta);
  // Sent back as a transferable ArrayBuffer, not copied.
  const bytes = pdf.buffer.slice(pdf.byteOffset, pdf.byteOffset + pdf.byteLength);
  return bytes;
}
