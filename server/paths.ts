import { fileURLToPath } from 'node:url';
import path from 'node:path';

/** Absolute path of the repository root (the folder that holds package.json). */
export const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

export const dataDir = path.join(projectRoot, '.data');
export const migrationsFolder = path.join(projectRoot, 'schema', 'migrations');
export const clientDistDir = path.join(projectRoot, 'dist', 'client');
/** The Angular application builder writes the browser bundle one level down. */
export const clientBrowserDir = path.join(clientDistDir, 'browser');
