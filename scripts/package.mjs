// `npm run package` (after `node esbuild.mjs --production`): builds scatterwise-VERSION.vsix with
// @vscode/vsce from the bundles alone (see .vscodeignore), checks that nothing else slipped in,
// and prints its size. The repository field is left out on purpose (allowMissingRepository).
import { createVSIX, listFiles } from '@vscode/vsce';
import { existsSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const manifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const bundles = ['dist/extension.js', 'dist/worker.js', 'dist/scanWorker.js', 'dist/webview.js', 'dist/webview.css'];
const missing = bundles.filter((file) => !existsSync(join(root, file)));
if (missing.length) {
  console.error(`package: ${missing.join(', ')} missing; run \`node esbuild.mjs --production\` first.`);
  process.exit(1);
}

// The project config's schema ships too: package.json contributes it for scatterwise.config.json.
const allowed = new Set([...bundles, 'package.json', 'README.md', 'LICENSE', 'schemas/scatterwise.schema.json']);
const files = await listFiles({ cwd: root, dependencies: false });
const unexpected = files.filter((file) => !allowed.has(file.replace(/\\/g, '/')));
if (unexpected.length) {
  console.error(`package: files outside the bundles would ship: ${unexpected.slice(0, 20).join(', ')}`);
  process.exit(1);
}

const packagePath = join(root, `${manifest.name}-${manifest.version}.vsix`);
await createVSIX({ cwd: root, packagePath, dependencies: false, allowMissingRepository: true });
const bytes = statSync(packagePath).size;
console.log(`${packagePath.slice(root.length + 1)}: ${(bytes / 1024).toFixed(1)} KiB (${bytes} bytes), ${files.length} files: ${files.sort().join(', ')}`);
