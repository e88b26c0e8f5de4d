/**
 * Decides whether the production client build in dist/client is up to date and rebuilds it with
 * `ng build` when not. Fresh means: the build stamp is newer than every file under client/ and
 * shared/ and than angular.json and tsconfig.json.
 */
import { spawn } from 'node:child_process';
import { existsSync } from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';
import { clientBrowserDir, clientDistDir, projectRoot } from './paths';

export const clientEntry = path.join(projectRoot, 'client', 'src', 'main.ts');
const stampFile = path.join(clientDistDir, '.build-stamp');
/** What the build depends on; a change to any of these makes the build stale. */
export const clientBuildInputs = ['client', 'shared', 'angular.json', 'tsconfig.json'];

export const clientSourcesExist = () => existsSync(clientEntry);
export const clientBuildExists = () => existsSync(path.join(clientBrowserDir, 'index.html'));

async function newestMtime(target: string): Promise<number> {
  let stat;
  try {
    stat = await fs.stat(target);
  } catch {
    return 0;
  }
  if (!stat.isDirectory()) return stat.mtimeMs;
  let newest = stat.mtimeMs;
  for (const entry of await fs.readdir(target)) {
    if (entry === 'node_modules' || entry === '.angular') continue;
    newest = Math.max(newest, await newestMtime(path.join(target, entry)));
  }
  return newest;
}

/** True when the build (its stamp) is newer than every input; `root` is for tests. */
export async function clientBuildIsFresh(root = projectRoot): Promise<boolean> {
  const dist = path.join(root, path.relative(projectRoot, clientDistDir));
  if (!existsSync(path.join(dist, 'browser', 'index.html'))) return false;
  let built: number;
  try {
    built = (await fs.stat(path.join(dist, '.build-stamp'))).mtimeMs;
  } catch {
    return false;
  }
  const sources = clientBuildInputs.map((p) => path.join(root, p));
  const newest = Math.max(...(await Promise.all(sources.map(newestMtime))));
  return built > newest;
}

/** Runs the production build; the stamp gets the build's start time, so edits made meanwhile still count as newer. */
export async function buildClient(log: (message: string) => void = console.log): Promise<void> {
  const started = new Date();
  log('Building the client (ng build, production)…');
  await new Promise<void>((resolve, reject) => {
    const child = spawn(path.join(projectRoot, 'node_modules', '.bin', 'ng'), ['build', '--configuration', 'production'], {
      cwd: projectRoot,
      stdio: ['ignore', 'inherit', 'inherit'],
      env: { ...process.env, NG_CLI_ANALYTICS: 'false' },
    });
    child.once('error', reject);
    child.once('exit', (code, signal) =>
      code === 0 ? resolve() : reject(new Error(`ng build failed (${code ?? signal}); see its output above.`)),
    );
  });
  await fs.writeFile(stampFile, `${started.toISOString()}\n`);
  await fs.utimes(stampFile, started, started);
}

/** Builds when the sources exist and the build is stale; returns the folder to serve, or null. */
export async function ensureClientBuild(log: (message: string) => void = console.log): Promise<string | null> {
  if (clientSourcesExist()) {
    if (await clientBuildIsFresh()) log('Client build is up to date.');
    else await buildClient(log);
  }
  return clientBuildExists() ? clientBrowserDir : null;
}
