// Example worksheets offered by "new from an example": the worksheet documents in examples/*.json,
// with the data files beside them (a data step names a file by the SHA-256 of its bytes).
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { parseWorksheet, type Worksheet } from '@shared/format/worksheet';
import type { ExampleSummary } from '@shared/api/worksheets';
import { projectRoot } from '../paths';

export const examplesDir = path.join(projectRoot, 'examples');

export interface Example extends ExampleSummary {
  document: Worksheet;
}

export interface ExampleFile {
  name: string;
  bytes: Uint8Array;
}

let examples: Example[] | undefined;
let files: Map<string, ExampleFile> | undefined;

/** The valid worksheet documents in examples/, sorted by id (the file name without .json). */
export function listExamples(dir = examplesDir): Example[] {
  if (examples && dir === examplesDir) return examples;
  const found: Example[] = [];
  let names: string[] = [];
  try {
    names = readdirSync(dir).filter((n) => n.endsWith('.json')).sort();
  } catch {
    names = [];
  }
  for (const name of names) {
    let value: unknown;
    try {
      value = JSON.parse(readFileSync(path.join(dir, name), 'utf8'));
    } catch {
      continue;
    }
    const parsed = parseWorksheet(value);
    if (!parsed.ok) continue;
    found.push({
      id: name.replace(/\.json$/, ''),
      title: parsed.worksheet.title,
      description: parsed.worksheet.description ?? '',
      document: parsed.worksheet,
    });
  }
  if (dir === examplesDir) examples = found;
  return found;
}

export function findExample(id: string): Example | undefined {
  return listExamples().find((e) => e.id === id);
}

/** Data files in examples/ (CSV, TSV, TXT, XLSX) by the SHA-256 of their bytes. */
export function exampleDataFiles(dir = examplesDir): Map<string, ExampleFile> {
  if (files && dir === examplesDir) return files;
  const map = new Map<string, ExampleFile>();
  let names: string[] = [];
  try {
    names = readdirSync(dir).filter((n) => /\.(csv|tsv|txt|xlsx)$/i.test(n)).sort();
  } catch {
    names = [];
  }
  for (const name of names) {
    const bytes = new Uint8Array(readFileSync(path.join(dir, name)));
    map.set(createHash('sha256').update(bytes).digest('hex'), { name, bytes });
  }
  if (dir === examplesDir) files = map;
  return map;
}
