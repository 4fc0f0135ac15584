// Text of a PDF through pdf-parse, run in a child Node process: pdf.js sets up its worker with a
// dynamic import(), which Jest refuses in-process without --experimental-vm-modules.
import { execFile } from 'node:child_process';
import path from 'node:path';

export interface PdfText {
  text: string;
  pages: number;
  info: Record<string, unknown>;
}

export function pdfText(pdf: Buffer): Promise<PdfText> {
  return new Promise((resolve, reject) => {
    const child = execFile(
      process.execPath,
      [path.join(__dirname, 'pdfTextWorker.mjs')],
      { maxBuffer: 32 * 1024 * 1024, cwd: path.resolve(__dirname, '..', '..') },
      (error, stdout, stderr) => {
        if (error) reject(new Error(`pdf-parse failed: ${stderr || error.message}`));
        else resolve(JSON.parse(stdout) as PdfText);
      },
    );
    child.stdin!.end(pdf);
  });
}
