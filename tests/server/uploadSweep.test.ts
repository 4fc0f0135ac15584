// Start-up clean-up of upload temp files that a killed process left behind: only files named like
// the upload temp files, and only old ones (an upload in flight on another instance is spared).
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { sweepStaleUploads } from '@/server/services/captures';

describe('sweepStaleUploads', () => {
  it('removes old temp files only, and leaves stored captures and other files alone', async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'ringwell-sweep-'));
    const sha = 'a'.repeat(64);
    const names = {
      stored: sha,
      oldTemp: `.${sha}.0123456789ab.tmp`,
      freshTemp: `.${'b'.repeat(64)}.ba9876543210.tmp`,
      other: 'notes.tmp',
    };
    for (const name of Object.values(names)) fs.writeFileSync(path.join(dir, name), 'x');
    const twoHoursAgo = new Date(Date.now() - 2 * 3600 * 1000);
    for (const name of [names.oldTemp, names.other, names.stored]) fs.utimesSync(path.join(dir, name), twoHoursAgo, twoHoursAgo);

    expect(await sweepStaleUploads(dir)).toEqual([names.oldTemp]);
    expect(fs.readdirSync(dir).sort()).toEqual([names.freshTemp, names.other, names.stored].sort());
    expect(await sweepStaleUploads(path.join(dir, 'missing'))).toEqual([]);
    fs.rmSync(dir, { recursive: true, force: true });
  });
});
