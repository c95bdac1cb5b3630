// A small, safe reader of the light markdown used in thread posts. It never passes markup
// through: the source becomes a tree of plain tokens (text is only ever text), which the client
// turns into elements and `markdownToHtml` turns into escaped HTML. What it understands:
// **bold**, *italic*, `code`, [text](https://...) and bare http(s) addresses as links, @mentions
// of given names, lists ("- ", "* ", "1. "), ``` fenced code, and line breaks. Anything else,
// including HTML tags, stays literal text.

export type MarkdownInline =
  | { type: "text"; text: string }
  | { type: "strong"; children: MarkdownInline[] }
  | { type: "em"; children: MarkdownInline[] }
  | { type: "code"; text: string }
  | { type: "link"; href: string; children: MarkdownInline[] }
  | { type: "mention"; name: string }
  | { type: "break" };

export type MarkdownBlock =
  | { type: "paragraph"; children: MarkdownInline[] }
  | { type: "list"; ordered: boolean; start: number; items: MarkdownInline[][] }
  | { type: "codeBlock"; text: string };

export interface MarkdownOptions {
  /** Names that "@Name" marks as a mention (the study's members); the longest match wins. */
  mentionNames?: readonly string[];
  /** Counts the reader's steps when given (tests show the work grows linearly with the text). */
  work?: MarkdownWork;
}

/** Bodies are at most this long (the API refuses longer ones). */
export const MARKDOWN_MAX_LENGTH = 10_000;

/** Nesting of bold/italic/link inside each other stops here; deeper markers stay text. */
const MAX_DEPTH = 4;

const SAFE_URL = /^https?:\/\/[^\s<>"'`]+$/i;
const ITEM = /^( {0,3})([-*+]|(\d{1,9})[.)])\s+(.*)$/;
const FENCE = /^ {0,3}```/;

/** Only http and https addresses become links; everything else (javascript:, data:, relative) stays text. */
export function isSafeHref(href: string): boolean {
  if (!SAFE_URL.test(href)) return false;
  try {
    const url = new URL(href);
    return url.protocol === "http:" || url.protocol === "https:";
  } catch {
    return false;
  }
}

export function parseMarkdown(source: string, options: MarkdownOptions = {}): MarkdownBlock[] {
  const names = [...new Set(options.mentionNames ?? [])].filter((n) => n.trim().length > 0).sort((a, b) => b.length - a.length);
  const work = options.work ?? { steps: 0 };
  const inline = (text: string) => parseInline(text, names, 0, work);
  const lines = source.replace(/\r\n?/g, "\n").split("\n");
  const blocks: MarkdownBlock[] = [];
  let paragraph: string[] = [];
  let list: { ordered: boolean; start: number; items: string[][] } | null = null;

  const flushParagraph = () => {
    if (paragraph.length) blocks.push({ type: "paragraph", children: joinLines(paragraph.map(inline)) });
    paragraph = [];
  };
  const flushList = () => {
    if (list) blocks.push({ type: "list", ordered: list.ordered, start: list.start, items: list.items.map((item) => joinLines(item.map(inline))) });
    list = null;
  };

  for (let i = 0; i < lines.length; i++) {
    const line = lines[i];
    work.steps += line.length + 1;
    if (FENCE.test(line)) {
      flushParagraph();
      flushList();
      const body: string[] = [];
      i++;
      while (i < lines.length && !FENCE.test(lines[i])) {
        work.steps += lines[i].length + 1;
        body.push(lines[i++]);
      }
      blocks.push({ type: "codeBlock", text: body.join("\n") });
      continue;
    }
    if (line.trim() === "") {
      flushParagraph();
      flushList();
      continue;
    }
    const item = ITEM.exec(line);
    if (item) {
      const ordered = item[3] !== undefined;
      flushParagraph();
      if (list && list.ordered !== ordered) flushList();
      if (!list) list = { ordered, start: ordered ? Number(item[3]) : 1, items: [] };
      list.items.push([item[4]]);
      continue;
    }
    if (list && /^\s+\S/.test(line)) {
      // An indented line continues the list item above it.
      list.items[list.items.length - 1].push(line.trim());
      continue;
    }
    flushList();
    paragraph.push(line);
  }
  flushParagraph();
  flushList();
  return blocks;
}

function joinLines(lines: MarkdownInline[][]): MarkdownInline[] {
  const out: MarkdownInline[] = [];
  lines.forEach((nodes, i) => {
    if (i > 0) out.push({ type: "break" });
    out.push(...nodes);
  });
  return mergeText(out);
}

function mergeText(nodes: MarkdownInline[]): MarkdownInline[] {
  const out: MarkdownInline[] = [];
  for (const node of nodes) {
    const last = out[out.length - 1];
    if (node.type === "text" && last?.type === "text") out[out.length - 1] = { type: "text", text: last.text + node.text };
    else if (node.type !== "text" || node.text !== "") out.push(node);
  }
  return out;
}

const isWordChar = (ch: string | undefined) => ch !== undefined && /[\p{L}\p{N}_]/u.test(ch);
const ESCAPABLE = /[\\`*_[\]()@#+\-.!>]/;
const URL_STOP = /[\s<>"'`]/;
const URL_PREFIX = /https?:\/\//iy;
/** Punctuation that ends a sentence is not part of a bare address. */
const TRAILING_PUNCTUATION = new Set([".", ",", ";", ":", "!", "?", ")", "]"]);

/**
 * Addresses longer than this are not made links (they stay text): it bounds the work one "[" or
 * "http" can cost. Browsers and servers commonly handle addresses up to about 2,000 characters
 * (common practice, no source).
 */
export const MARKDOWN_MAX_HREF_LENGTH = 2048;

/** Counts the reader's steps (characters looked at), for tests that show its work grows linearly with the text. */
export interface MarkdownWork {
  steps: number;
}

/**
 * One text's lookups, computed once from right to left so that reading it never scans ahead again
 * (a scan per "[", "*" or "`" made a line of 10,000 "[" quadratic): each entry is what a scan from
 * that position would find. The inside of **...**, *...* and [...] is read as a text of its own
 * with its own lookups; those insides do not overlap and nest at most MAX_DEPTH deep, so this
 * work stays within (MAX_DEPTH + 1) times the length of the line. Checking a candidate address
 * reads at most MARKDOWN_MAX_HREF_LENGTH characters.
 */
interface LineIndex {
  text: string;
  /** The first "`" at or after i; n when none. */
  nextBacktick: Int32Array;
  /** The first "**" starting at or after i; n when none. */
  nextDoubleStar: Int32Array;
  /** The first ")" at or after i; n when none. */
  nextParen: Int32Array;
  /** The first character at or after i that cannot be part of an address; n when none. */
  nextUrlStop: Int32Array;
  /** The closing single "*" of an italic run whose text starts at i (skipping "**" pairs and escapes); -1 when none. */
  closingStar: Int32Array;
  /** The "]" that closes a "[" whose text starts at i (nested brackets balanced, escapes skipped); -1 when none. */
  closingBracket: Int32Array;
}

/** Whether the character cannot be part of an address: white space (as \s has it) or one of < > " ' `. */
function isUrlStop(ch: string): boolean {
  const code = ch.charCodeAt(0);
  if (code < 128) return code === 32 || (code >= 9 && code <= 13) || ch === "<" || ch === ">" || ch === '"' || ch === "'" || ch === "`";
  return URL_STOP.test(ch);
}

function indexLine(text: string, work: MarkdownWork): LineIndex {
  const n = text.length;
  const size = n + 3;
  // One allocation for all six tables (a post may hold thousands of short *...* runs, each indexed).
  const buffer = new Int32Array(6 * size);
  const nextBacktick = buffer.subarray(0, size).fill(n);
  const nextDoubleStar = buffer.subarray(size, 2 * size).fill(n);
  const nextParen = buffer.subarray(2 * size, 3 * size).fill(n);
  const nextUrlStop = buffer.subarray(3 * size, 4 * size).fill(n);
  const closingStar = buffer.subarray(4 * size, 5 * size).fill(-1);
  const closingBracket = buffer.subarray(5 * size, 6 * size).fill(-1);
  work.steps += n;
  for (let i = n - 1; i >= 0; i--) {
    const ch = text[i];
    nextBacktick[i] = ch === "`" ? i : nextBacktick[i + 1];
    nextDoubleStar[i] = ch === "*" && text[i + 1] === "*" ? i : nextDoubleStar[i + 1];
    nextParen[i] = ch === ")" ? i : nextParen[i + 1];
    nextUrlStop[i] = isUrlStop(ch) ? i : nextUrlStop[i + 1];
    // Both walks read only positions after i, which are already filled in.
    if (ch === "\\") {
      closingStar[i] = closingStar[i + 2];
      closingBracket[i] = closingBracket[i + 2];
      continue;
    }
    if (ch === "*" && text[i + 1] === "*") {
      const close = nextDoubleStar[i + 2];
      closingStar[i] = close < n ? closingStar[close + 2] : -1;
    } else closingStar[i] = ch === "*" ? i : closingStar[i + 1];
    if (ch === "[") {
      const inner = closingBracket[i + 1];
      closingBracket[i] = inner < 0 ? -1 : closingBracket[inner + 1];
    } else closingBracket[i] = ch === "]" ? i : closingBracket[i + 1];
  }
  return { text, nextBacktick, nextDoubleStar, nextParen, nextUrlStop, closingStar, closingBracket };
}

function parseInline(text: string, names: readonly string[], depth: number, work: MarkdownWork): MarkdownInline[] {
  // Built on first need: most texts inside *...* or [...] hold no marker that needs it.
  let lookups: LineIndex | null = null;
  const line = () => (lookups ??= indexLine(text, work));
  const hi = text.length;
  const at = (i: number): string | undefined => text[i];
  const inside = (i: number) => i >= 0 && i < hi;
  const out: MarkdownInline[] = [];
  let plain = "";
  const flush = () => {
    if (plain) out.push({ type: "text", text: plain });
    plain = "";
  };
  let i = 0;
  while (i < hi) {
    work.steps++;
    const ch = text[i];

    if (ch === "\\" && i + 1 < hi && ESCAPABLE.test(text[i + 1])) {
      plain += text[i + 1];
      i += 2;
      continue;
    }

    if (ch === "`") {
      const end = line().nextBacktick[i + 1];
      if (inside(end) && end > i + 1) {
        flush();
        out.push({ type: "code", text: text.slice(i + 1, end) });
        i = end + 1;
        continue;
      }
    }

    if (depth < MAX_DEPTH && ch === "*" && at(i + 1) === "*") {
      const end = line().nextDoubleStar[i + 2];
      if (inside(end + 1) && end > i + 2 && text[i + 2] !== " " && text[end - 1] !== " ") {
        flush();
        out.push({ type: "strong", children: parseInline(text.slice(i + 2, end), names, depth + 1, work) });
        i = end + 2;
        continue;
      }
    }

    if (depth < MAX_DEPTH && ch === "*" && at(i + 1) !== "*" && at(i + 1) !== " " && at(i + 1) !== undefined) {
      const end = line().closingStar[i + 1];
      if (inside(end) && end > i + 1 && text[end - 1] !== " ") {
        flush();
        out.push({ type: "em", children: parseInline(text.slice(i + 1, end), names, depth + 1, work) });
        i = end + 1;
        continue;
      }
    }

    if (depth < MAX_DEPTH && ch === "[") {
      const link = readLink(line(), i, hi, work);
      if (link) {
        flush();
        out.push({ type: "link", href: link.href, children: parseInline(text.slice(i + 1, link.labelEnd), names, depth + 1, work) });
        i = link.end;
        continue;
      }
    }

    if ((ch === "h" || ch === "H") && !isWordChar(at(i - 1))) {
      const href = readBareUrl(line(), i, hi, work);
      if (href) {
        flush();
        out.push({ type: "link", href, children: [{ type: "text", text: href }] });
        i += href.length;
        continue;
      }
    }

    if (ch === "@" && !isWordChar(at(i - 1)) && names.length) {
      const name = names.find((n) => {
        work.steps += n.length;
        return i + 1 + n.length <= hi && text.startsWith(n, i + 1) && !isWordChar(at(i + 1 + n.length));
      });
      if (name) {
        flush();
        out.push({ type: "mention", name });
        i += 1 + name.length;
        continue;
      }
    }

    plain += ch;
    i++;
  }
  flush();
  return mergeText(out);
}

/** `[label](http...)` starting at `start`, ending before `hi`; null when it is not a link with a safe address. */
function readLink(line: LineIndex, start: number, hi: number, work: MarkdownWork): { labelEnd: number; href: string; end: number } | null {
  const { text } = line;
  const labelEnd = line.closingBracket[start + 1];
  if (labelEnd < 0 || labelEnd + 1 >= hi || text[labelEnd + 1] !== "(" || labelEnd === start + 1) return null;
  const close = line.nextParen[labelEnd + 2];
  if (close >= hi || close - (labelEnd + 2) > MARKDOWN_MAX_HREF_LENGTH) return null;
  work.steps += close - (labelEnd + 2);
  const href = text.slice(labelEnd + 2, close).trim();
  return isSafeHref(href) ? { labelEnd, href, end: close + 1 } : null;
}

/** A bare http(s) address starting at `start`, without a sentence's closing punctuation; null when there is none. */
function readBareUrl(line: LineIndex, start: number, hi: number, work: MarkdownWork): string | null {
  const { text } = line;
  URL_PREFIX.lastIndex = start;
  if (!URL_PREFIX.test(text)) return null;
  const afterPrefix = URL_PREFIX.lastIndex;
  let end = Math.min(line.nextUrlStop[afterPrefix], hi);
  if (end <= afterPrefix || end - start > MARKDOWN_MAX_HREF_LENGTH) return null;
  work.steps += end - start;
  while (end > start && TRAILING_PUNCTUATION.has(text[end - 1])) end--;
  const href = text.slice(start, end);
  return isSafeHref(href) ? href : null;
}

// ---------------------------------------------------------------- output

const HTML_ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (ch) => HTML_ESCAPES[ch]);
}

function inlineHtml(nodes: MarkdownInline[]): string {
  return nodes
    .map((node) => {
      switch (node.type) {
        case "text":
          return escapeHtml(node.text);
        case "strong":
          return `<strong>${inlineHtml(node.children)}</strong>`;
        case "em":
          return `<em>${inlineHtml(node.children)}</em>`;
        case "code":
          return `<code>${escapeHtml(node.text)}</code>`;
        case "link":
          return `<a href="${escapeHtml(node.href)}" rel="nofollow noopener noreferrer">${inlineHtml(node.children)}</a>`;
        case "mention":
          return `<span class="mention">@${escapeHtml(node.name)}</span>`;
        case "break":
          return "<br>";
      }
    })
    .join("");
}

/** The post as HTML in which every character of the source is escaped; only the tags above are produced. */
export function markdownToHtml(source: string, options: MarkdownOptions = {}): string {
  return parseMarkdown(source, options)
    .map((block) => {
      switch (block.type) {
        case "paragraph":
          return `<p>${inlineHtml(block.children)}</p>`;
        case "codeBlock":
          return `<pre><code>${escapeHtml(block.text)}</code></pre>`;
        case "list": {
          const tag = block.ordered ? "ol" : "ul";
          const start = block.ordered && block.start !== 1 ? ` start="${block.start}"` : "";
          return `<${tag}${start}>${block.items.map((item) => `<li>${inlineHtml(item)}</li>`).join("")}</${tag}>`;
        }
      }
    })
    .join("\n");
}

function inlineText(nodes: MarkdownInline[]): string {
  return nodes
    .map((node) => {
      switch (node.type) {
        case "text":
        case "code":
          return node.text;
        case "strong":
        case "em":
          return inlineText(node.children);
        case "link": {
          const label = inlineText(node.children);
          return label === node.href ? label : `${label} (${node.href})`;
        }
        case "mention":
          return `@${node.name}`;
        case "break":
          return " ";
      }
    })
    .join("");
}

/** The post without its markers, on one line, cut to `max` characters: for e-mails and notifications. */
export function markdownExcerpt(source: string, max = 280): string {
  const text = parseMarkdown(source)
    .map((block) => {
      if (block.type === "paragraph") return inlineText(block.children);
      if (block.type === "codeBlock") return block.text.replace(/\s+/g, " ");
      return block.items.map((item) => `• ${inlineText(item)}`).join(" ");
    })
    .join(" ")
    .replace(/\s+/g, " ")
    .trim();
  return text.length <= max ? text : `${text.slice(0, max - 1).trimEnd()}…`;
}
