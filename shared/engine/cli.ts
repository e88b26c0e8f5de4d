// Command line: evaluate a worksheet file and print its results as JSON.
//
//   npm run evaluate -- <worksheet.json> [--data <file.csv> ...] [--canonical]
//
// Each --data file is registered under the SHA-256 of its bytes, the id data steps use
// ("origin": "dataset", "datasetId": "<sha256>"). Output: the results as indented JSON (or the
// canonical form that is hashed, with --canonical) on stdout; the results hash on stderr.
// Exit codes: 0 every step evaluated; 1 some steps report errors (results still printed);
// 2 bad usage, unreadable file or not a valid worksheet (message on stderr).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { evaluate, resultsHash, WorksheetError } from './evaluate';
import { canonicalJson, sha256Hex } from './hash';

const USAGE = 'usage: npm run evaluate -- <worksheet.json> [--data <file> ...] [--canonical]';

export interface CliOutcome {
  code: 0 | 1 | 2;
  stdout: string;
  stderr: string;
}

export function runCli(args: readonly string[], readFile: (path: string) => Uint8Array = (p) => readFileSync(p)): CliOutcome {
  let worksheetPath: string | null = null;
  const dataPaths: string[] = [];
  let canonical = false;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (a === '--data') {
      const next = args[++i];
      if (next === undefined) return { code: 2, stdout: '', stderr: `--data needs a file name\n${USAGE}\n` };
      dataPaths.push(next);
    } else if (a === '--canonical') {
      canonical = true;
    } else if (a === '--help' || a === '-h') {
      return { code: 0, stdout: `${USAGE}\n`, stderr: '' };
    } else if (a.startsWith('--')) {
      return { code: 2, stdout: '', stderr: `unknown option ${a}\n${USAGE}\n` };
    } else if (worksheetPath === null) {
      worksheetPath = a;
    } else {
      return { code: 2, stdout: '', stderr: `more than one worksheet given (${worksheetPath}, ${a})\n${USAGE}\n` };
    }
  }
  if (worksheetPath === null) return { code: 2, stdout: '', stderr: `${USAGE}\n` };

  let document: unknown;
  try {
    document = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(readFile(worksheetPath)));
  } catch (e) {
    return { code: 2, stdout: '', stderr: `cannot read ${worksheetPath} as JSON: ${e instanceof Error ? e.message : String(e)}\n` };
  }
  const datasets: Record<string, Uint8Array> = {};
  for (const p of dataPaths) {
    try {
      const bytes = readFile(p);
      datasets[sha256Hex(bytes)] = bytes;
    } catch (e) {
      return { code: 2, stdout: '', stderr: `cannot read data file ${p}: ${e instanceof Error ? e.message : String(e)}\n` };
    }
  }
  try {
    const result = evaluate(document, datasets);
    const text = canonical ? canonicalJson(result) + '\n' : JSON.stringify(result, null, 2) + '\n';
    const errors = result.steps.filter((s) => s.status === 'error');
    const notes = errors.map((s) => `error: ${s.error?.message}`).join('\n');
    return {
      code: errors.length ? 1 : 0,
      stdout: text,
      stderr: `${notes ? notes + '\n' : ''}${result.counts.ok} steps ok, ${result.counts.error} with errors; engine ${result.engineVersion}; results hash ${resultsHash(result)}\n`,
    };
  } catch (e) {
    if (e instanceof WorksheetError) {
      return { code: 2, stdout: '', stderr: `${worksheetPath} is not a valid worksheet:\n${e.issues.map((i) => `  ${i.field}: ${i.message}`).join('\n')}\n` };
    }
    throw e;
  }
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const outcome = runCli(process.argv.slice(2));
  process.stdout.write(outcome.stdout);
  process.stderr.write(outcome.stderr);
  process.exitCode = outcome.code;
}
