/** Short forms of a person's display name. Pure (unit-tested under mocha). */

/** Up to two initials: first and last word ("Ines Okafor" → "IO"). */
export function initialsOf(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean);
  const picked = parts.length > 1 ? [parts[0]!, parts[parts.length - 1]!] : parts;
  return picked.map((p) => Array.from(p)[0]!.toUpperCase()).join('');
}

/** The first word of the name, for greetings. */
export function firstNameOf(name: string): string {
  return name.trim().split(/\s+/)[0] ?? '';
}
