// Reads a PDF on stdin and prints { text, pages, info } as JSON, with pdf-parse in plain Node
// (pdf.js needs ES-module dynamic imports that Jest does not allow in-process).
import { Buffer } from 'node:buffer';
import process from 'node:process';
import { PDFParse } from 'pdf-parse';

const chunks = [];
for await (const chunk of process.stdin) chunks.push(chunk);
const parser = new PDFParse({ data: new Uint8Array(Buffer.concat(chunks)) });
try {
  const text = await parser.getText();
  const info = await parser.getInfo();
  process.stdout.write(JSON.stringify({ text: text.text, pages: text.total, info: info.info ?? {} }));
} finally {
  await parser.destroy();
}
