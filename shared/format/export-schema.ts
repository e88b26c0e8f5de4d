// Writes shared/format/worksheet.schema.json from the zod schema: npx tsx shared/format/export-schema.ts
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { worksheetJsonSchema } from './worksheet';

export function worksheetSchemaText(): string {
  return JSON.stringify(worksheetJsonSchema(), null, 2) + '\n';
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const target = fileURLToPath(new URL('./worksheet.schema.json', import.meta.url));
  writeFileSync(target, worksheetSchemaText());
  console.log(`wrote ${target}`);
}
