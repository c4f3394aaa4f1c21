/**
 * The SHA-256 of a file, read in 1 MiB blocks (the file is opened read-only). Generated scripts
 * carry it so that `--check` can tell whether they read the same bytes as the fit.
 */
import { createHash } from 'node:crypto';
import { createReadStream } from 'node:fs';

export function fileSha256(path: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash('sha256');
    createReadStream(path, { flags: 'r', highWaterMark: 1 << 20 })
      .on('data', (block) => hash.update(block))
      .on('error', reject)
      .on('end', () => resolve(hash.digest('hex')));
  });
}
