// A batch's sheets as one zip (deflate level 6), entry dates fixed to each unit's last change.
import { ZipArchive } from 'archiver';

export function zipArchive(entries: { name: string; data: Buffer; date: Date }[]) {
  return new Promise<Buffer>((resolve, reject) => {
    const archive = new ZipArchive({ zlib: { level: 6 } });
    const chunks: Buffer[] = [];
    archive.on('data', (chunk: Buffer) => chunks.push(chunk));
    archive.on('error', reject);
    archive.on('end', () => resolve(Buffer.concat(chunks)));
    for (const e of entries) archive.append(e.data, { name: e.name, date: e.date });
    void archive.finalize().catch(reject);
  });
}
