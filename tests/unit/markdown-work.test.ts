// The thread markdown reader's work grows linearly with the post (a post of 10,000 "[" used to
// take a scan per "[", about 0.5 s). Without timing anything, the reader counts its steps
// (characters looked at); for adversarial posts of the maximum length, the count stays within a
// small multiple of the length and doubles, not quadruples, when the post doubles. The outputs
// are checked too: adversarial posts stay literal text, ordinary ones read as before (expected
// outputs worked by hand from the rules at the top of shared/markdown.ts). Parse times of the
// same posts are printed by `npm run bench` (bench/markdown.ts).
import { describe, expect, it } from "vitest";
import { MARKDOWN_MAX_HREF_LENGTH, MARKDOWN_MAX_LENGTH, escapeHtml, markdownToHtml, parseMarkdown } from "@shared/markdown";
import { ADVERSARIAL_POSTS } from "../support/adversarialPosts";

const steps = (source: string, mentionNames: string[] = []) => {
  const work = { steps: 0 };
  parseMarkdown(source, { mentionNames, work });
  return work.steps;
};

/**
 * Worst steps per character: a few passes per nesting level, plus the address checks. One check
 * reads at most MARKDOWN_MAX_HREF_LENGTH (L) characters, and only openers within L characters
 * before the address's end get that far; a link opener "[a](" takes 4 characters, so a stretch of
 * L characters costs at most (L / 4) * L / 2 steps, L / 8 per character.
 */
const MAX_STEPS_PER_CHARACTER = MARKDOWN_MAX_HREF_LENGTH / 8 + 16;

describe("markdown: linear work on adversarial posts of the maximum length", () => {
  for (const post of ADVERSARIAL_POSTS) {
    it(`${post.name}: at most ${MAX_STEPS_PER_CHARACTER} steps per character, and twice the post costs about twice the steps`, () => {
      const full = post.make(MARKDOWN_MAX_LENGTH);
      expect(full.length).toBe(MARKDOWN_MAX_LENGTH);
      const fullSteps = steps(full, ["Ada", "Ada Stone"]);
      const halfSteps = steps(post.make(MARKDOWN_MAX_LENGTH / 2), ["Ada", "Ada Stone"]);
      expect(fullSteps).toBeLessThanOrEqual(MAX_STEPS_PER_CHARACTER * MARKDOWN_MAX_LENGTH);
      // Quadratic work would make this ratio about 4.
      expect(fullSteps / halfSteps).toBeLessThan(2.3);
    });
  }

  it("the posts that were quadratic stay literal text", () => {
    for (const unit of ["[", "]", "[a](", "`", "_", "\\[", "a* "]) {
      const source = unit.repeat(Math.floor(MARKDOWN_MAX_LENGTH / unit.length));
      const expected = unit === "\\[" ? "[".repeat(MARKDOWN_MAX_LENGTH / 2) : unit === "`" ? null : source;
      if (expected === null) continue; // a line of backticks opens a code block; checked below
      expect(markdownToHtml(source), unit).toBe(`<p>${escapeHtml(expected)}</p>`);
    }
    // Adjacent backticks enclose nothing, so none of them opens a code span.
    expect(markdownToHtml(`x ${"`".repeat(MARKDOWN_MAX_LENGTH - 2)}`)).toBe(`<p>x ${"`".repeat(MARKDOWN_MAX_LENGTH - 2)}</p>`);
    expect(markdownToHtml("*".repeat(MARKDOWN_MAX_LENGTH))).toBe(`<p>${"*".repeat(MARKDOWN_MAX_LENGTH)}</p>`);
  });

  it("reads long runs of pairs correctly: *a*a*a... alternates italic a and a; `a`a`a... code and a", () => {
    expect(markdownToHtml("*a".repeat(5000))).toBe(`<p>${"<em>a</em>a".repeat(2500)}</p>`);
    expect(markdownToHtml("`a".repeat(5000))).toBe(`<p>${"<code>a</code>a".repeat(2500)}</p>`);
    expect(markdownToHtml("[a](https://e.org)".repeat(500))).toBe(`<p>${'<a href="https://e.org" rel="nofollow noopener noreferrer">a</a>'.repeat(500)}</p>`);
  });
});

describe("markdown: ordinary posts read as before", () => {
  it("links inside bold, bold inside links, nested brackets in a label, escaped brackets", () => {
    expect(markdownToHtml("**see [the note](https://example.org/n)**")).toBe('<p><strong>see <a href="https://example.org/n" rel="nofollow noopener noreferrer">the note</a></strong></p>');
    expect(markdownToHtml("[**bold** label](https://example.org)")).toBe('<p><a href="https://example.org" rel="nofollow noopener noreferrer"><strong>bold</strong> label</a></p>');
    expect(markdownToHtml("[a [b] c](https://example.org)")).toBe('<p><a href="https://example.org" rel="nofollow noopener noreferrer">a [b] c</a></p>');
    expect(markdownToHtml("\\[not a link](https://example.org)")).toBe('<p>[not a link](<a href="https://example.org" rel="nofollow noopener noreferrer">https://example.org</a>)</p>');
  });

  it("code spans keep their markers, italic skips bold pairs, an unclosed marker stays text", () => {
    expect(markdownToHtml("`*not* [x](https://e.org)` and *it **has** bold*")).toBe("<p><code>*not* [x](https://e.org)</code> and <em>it <strong>has</strong> bold</em></p>");
    expect(markdownToHtml("*open [open `open **open")).toBe("<p>*open [open `open **open</p>");
  });

  it("bare addresses end before closing punctuation; an address longer than the limit stays text", () => {
    expect(markdownToHtml("(see https://example.org/a_b?c=1).")).toBe('<p>(see <a href="https://example.org/a_b?c=1" rel="nofollow noopener noreferrer">https://example.org/a_b?c=1</a>).</p>');
    const long = `https://example.org/${"a".repeat(MARKDOWN_MAX_HREF_LENGTH)}`;
    expect(markdownToHtml(long)).toBe(`<p>${long}</p>`);
    expect(markdownToHtml(`[x](${long})`)).toBe(`<p>[x](${long})</p>`);
    const fits = `https://example.org/${"a".repeat(MARKDOWN_MAX_HREF_LENGTH - 20)}`;
    expect(markdownToHtml(fits)).toBe(`<p><a href="${fits}" rel="nofollow noopener noreferrer">${fits}</a></p>`);
  });

  it("mentions inside formatting", () => {
    expect(markdownToHtml("**@Ada Stone** and *@Ada*", { mentionNames: ["Ada", "Ada Stone"] })).toBe(
      '<p><strong><span class="mention">@Ada Stone</span></strong> and <em><span class="mention">@Ada</span></em></p>',
    );
  });
});
