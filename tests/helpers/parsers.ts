/** superagent body parsers for the API tests: NDJSON streams as text, downloads as bytes. */
type Parser = (res: NodeJS.ReadableStream, cb: (err: Error | null, body: unknown) => void) => void;

export const asText: Parser = (res, cb) => {
  let text = '';
  res.on('data', (c: Buffer) => (text += c.toString()));
  res.on('end', () => cb(null, text));
};

export const asBytes: Parser = (res, cb) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => cb(null, Buffer.concat(chunks)));
};

/** The events of an NDJSON answer read with asText. */
export const ndjsonEvents = (body: unknown) => String(body).trim().split('\n').map((line) => JSON.parse(line));
