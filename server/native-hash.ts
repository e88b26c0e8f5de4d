// Installs node:crypto's SHA-256 as the engine's hash (shared/engine/hash.ts, useSha256) in the
// process that imports this module: the server, and each evaluation thread (engine-task.ts). The
// function is the same as the pure one's (test/engine/hash.test.ts compares them); only faster.
import { createHash } from 'node:crypto';
import { useSha256 } from '@shared/engine/hash';

useSha256((input) => (typeof input === 'string' ? createHash('sha256').update(input, 'utf8') : createHash('sha256').update(input)).digest('hex'));
