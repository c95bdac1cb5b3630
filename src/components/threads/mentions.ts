// Mentions are written as "@Name" in the body; the post also carries the mentioned members' ids.

export interface Mentionable {
  id: string;
  name: string;
}

const isWordChar = (ch: string | undefined) => ch !== undefined && /[\p{L}\p{N}_]/u.test(ch);

/** Members whose "@Name" is still in the body (a picked name later deleted mentions no one). */
export function mentionedIds(body: string, members: readonly Mentionable[]): string[] {
  const ids: string[] = [];
  for (const member of members) {
    const needle = `@${member.name}`;
    let at = body.indexOf(needle);
    while (at >= 0) {
      if (!isWordChar(body[at - 1]) && !isWordChar(body[at + needle.length])) {
        ids.push(member.id);
        break;
      }
      at = body.indexOf(needle, at + 1);
    }
  }
  return ids;
}

/** The "@query" being typed just before the caret, if any: its start and the text after "@". */
export function mentionQueryAt(text: string, caret: number): { start: number; query: string } | null {
  const before = text.slice(0, caret);
  const at = before.lastIndexOf("@");
  if (at < 0 || isWordChar(before[at - 1])) return null;
  const query = before.slice(at + 1);
  // Names have spaces, but not line breaks, and are not endless.
  if (query.includes("\n") || query.length > 60) return null;
  return { start: at, query };
}

/** Members whose name starts with the query, then those with a word starting with it. */
export function matchMembers(query: string, members: readonly Mentionable[]): Mentionable[] {
  const q = query.trim().toLocaleLowerCase();
  if (!q) return [...members];
  const starts = members.filter((m) => m.name.toLocaleLowerCase().startsWith(q));
  const words = members.filter((m) => !starts.includes(m) && m.name.toLocaleLowerCase().split(/\s+/).some((w) => w.startsWith(q)));
  return [...starts, ...words];
}
