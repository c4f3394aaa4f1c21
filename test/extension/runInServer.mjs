// Runs the extension tests inside a real VS Code: the server build of VS Code 1.100 from npm
// (code-server, installed once into the git-ignored .vscode-test-server/), shown in Debian's
// headless Chromium through playwright-core. Exits with the tests' exit code.
//
//   node test/extension/runInServer.mjs [--folder sample-workspace] [--grep PATTERN] [--port N]
//
// The folder is copied into a temporary directory and the copy is opened.
//
// Build first (`node esbuild.mjs`): it needs dist/extension.js, dist/worker.js, dist/webview.js
// and out/test/extension/index.js. Tests may ask for a screenshot of the workbench by fetching
// $SCATTERWISE_SCREENSHOT_URL?name=NAME (the image goes to test-output/NAME.png), and for a real
// click in the workbench at $SCATTERWISE_WORKBENCH_URL/click?selector=CSS&text=TEXT.
import { spawn, spawnSync } from 'node:child_process';
import * as fs from 'node:fs';
import * as http from 'node:http';
import * as net from 'node:net';
import * as os from 'node:os';
import * as path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium } from 'playwright-core';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const argument = (name, fallback) => {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1] : fallback;
};
const sourceFolder = path.resolve(root, argument('folder', 'sample-workspace'));
const serverDir = path.join(root, '.vscode-test-server');
const outputDir = path.join(root, 'test-output');
const testsEntry = path.join(root, 'out/test/extension/index.js');
const timeoutMs = Number(process.env.TIMEOUT_MS || 1_800_000);

for (const needed of ['dist/extension.js', 'dist/worker.js', 'out/test/extension/index.js']) {
  if (!fs.existsSync(path.join(root, needed))) {
    console.error(`runInServer: ${needed} is missing; build first with \`node esbuild.mjs\`.`);
    process.exit(2);
  }
}

// Install the server on first use; the script returns at once when the install is complete.
const setup = spawnSync('bash', [path.join(root, 'scripts/setup-code-server.sh'), serverDir], { cwd: root, stdio: 'inherit' });
if (setup.status !== 0) {
  console.error('runInServer: installing code-server failed (see above).');
  process.exit(2);
}

function freePort() {
  return new Promise((resolve, reject) => {
    const probe = net.createServer().once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address();
      probe.close(() => resolve(port));
    });
  });
}

const port = Number(argument('port', 0)) || (await freePort());
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), 'scatterwise-code-server-'));
const userSettings = path.join(scratch, 'data/User');
fs.mkdirSync(userSettings, { recursive: true });
fs.writeFileSync(
  path.join(userSettings, 'settings.json'),
  JSON.stringify({
    'workbench.startupEditor': 'none',
    'workbench.tips.enabled': false,
    'telemetry.telemetryLevel': 'off',
    'update.mode': 'none',
    'git.openRepositoryInParentFolders': 'never',
  }),
);
fs.writeFileSync(path.join(scratch, 'config.yaml'), 'auth: none\n');
// The tests get a copy of the workspace folder, so what they write there (a project config, a git
// repository) never touches the repository's own sample workspace; the copy goes with the scratch.
const folder = path.join(scratch, 'workspace', path.basename(sourceFolder));
fs.cpSync(sourceFolder, folder, { recursive: true });
fs.mkdirSync(outputDir, { recursive: true });

// The tests run in the extension host; the page is here. They may ask, over loopback, for
//   /screenshot?name=NAME             a PNG of the workbench in test-output/NAME.png
//   /click?selector=CSS[&text=TEXT]   a real click on the first visible match (e.g. a notification's button)
let page;
const shots = http.createServer(async (request, response) => {
  const url = new URL(request.url, 'http://localhost');
  try {
    if (url.pathname === '/click') {
      let target = page.locator(url.searchParams.get('selector') ?? 'body');
      const text = url.searchParams.get('text');
      if (text) target = target.filter({ hasText: text });
      await target.first().click({ timeout: 10_000 });
      response.writeHead(200, { 'content-type': 'application/json' }).end('{}');
      return;
    }
    const name = url.searchParams.get('name') ?? 'workbench';
    const file = path.join(outputDir, `${name.replace(/[^\w.-]+/g, '_')}.png`);
    await page.screenshot({ path: file });
    response.writeHead(200, { 'content-type': 'application/json' }).end(JSON.stringify({ file }));
  } catch (error) {
    response.writeHead(500).end(String(error));
  }
});
const shotPort = await freePort();
await new Promise((resolve) => shots.listen(shotPort, '127.0.0.1', resolve));

const serverEntry = path.join(serverDir, 'node_modules/code-server/out/node/entry.js');
const serverLog = fs.createWriteStream(path.join(outputDir, 'code-server.log'));
const server = spawn(
  process.execPath,
  [serverEntry, '--config', path.join(scratch, 'config.yaml'), '--auth', 'none', '--bind-addr', `127.0.0.1:${port}`,
    '--disable-telemetry', '--disable-update-check', '--disable-workspace-trust', '--disable-getting-started-override',
    '--user-data-dir', path.join(scratch, 'data'), '--extensions-dir', path.join(scratch, 'extensions')],
  {
    stdio: ['ignore', 'pipe', 'pipe'],
    env: {
      ...process.env,
      // No look-ups of an extension gallery: these machines reach only npm and Debian.
      EXTENSIONS_GALLERY: process.env.EXTENSIONS_GALLERY || '{"serviceUrl":""}',
      SCATTERWISE_SCREENSHOT_URL: `http://127.0.0.1:${shotPort}/screenshot`,
      SCATTERWISE_WORKBENCH_URL: `http://127.0.0.1:${shotPort}`,
      MOCHA_GREP: argument('grep', process.env.MOCHA_GREP ?? ''),
    },
  },
);
server.stdout.pipe(serverLog);
server.stderr.pipe(serverLog);

let context;
let stopping = false;
function stop(code) {
  if (stopping) return;
  stopping = true;
  clearTimeout(timer);
  Promise.resolve(context?.close())
    .catch(() => undefined)
    .finally(() => {
      server.kill();
      shots.close();
      fs.rmSync(scratch, { recursive: true, force: true });
      process.exit(code);
    });
}
// Whatever goes wrong, the server and the browser go down with this process and the exit code says so.
process.on('unhandledRejection', (error) => {
  console.error(`runInServer: ${error?.message ?? error}`);
  stop(2);
});
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => stop(130));
const timer = setTimeout(() => {
  console.error(`runInServer: the tests did not finish within ${timeoutMs / 1000} s (see test-output/code-server.log).`);
  stop(2);
}, timeoutMs);

await new Promise((resolve, reject) => {
  let log = '';
  const seen = (chunk) => {
    log += chunk;
    if (log.includes('HTTP server listening')) resolve();
  };
  server.stdout.on('data', seen);
  server.stderr.on('data', seen);
  server.once('exit', (code) => reject(new Error(`code-server exited with ${code}:\n${log}`)));
}).catch((error) => {
  console.error(`runInServer: ${error.message}`);
  stop(2);
  return new Promise(() => {}); // stop() exits the process
});

const remote = (file) => `vscode-remote://127.0.0.1:${port}${file}`;
const payload = JSON.stringify([
  ['extensionDevelopmentPath', remote(root)],
  ['extensionTestsPath', remote(testsEntry)],
  ['skipWelcome', 'true'],
]);
const url = `http://127.0.0.1:${port}/?folder=${encodeURIComponent(folder)}&payload=${encodeURIComponent(payload)}`;
context = await chromium.launchPersistentContext(path.join(scratch, 'profile'), {
  executablePath: process.env.CHROMIUM || '/usr/bin/chromium',
  headless: true,
  viewport: { width: 1440, height: 900 },
  args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
    '--disable-component-update', '--disable-sync'],
});
page = context.pages()[0] ?? (await context.newPage());
page.on('pageerror', (error) => console.error('[workbench page error]', error.message));
// The workbench reports the test run through these two functions (VS Code's automation hooks).
await page.exposeFunction('codeAutomationLog', (type, args) => (console[type] ?? console.log)(...args));
const exitCode = await new Promise((resolve, reject) => {
  page
    .exposeFunction('codeAutomationExit', (code) => resolve(code))
    // A busy machine can take long to serve the workbench; the overall timer still bounds the run.
    .then(() => page.goto(url, { waitUntil: 'domcontentloaded', timeout: timeoutMs }))
    .catch(reject);
});
stop(exitCode);
