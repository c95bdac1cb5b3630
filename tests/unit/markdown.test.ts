// The thread posts' markdown reader: what it turns into formatting, and that nothing a person types
// (tags, event attributes, script addresses) ever becomes markup. Expected outputs are worked by
// hand from the rules at the top of shared/markdown.ts; the escaped characters (& < > " ') are
// the five of the OWASP Cross Site Scripting Prevention Cheat Sheet's HTML output encoding rule.
import { describe, expect, it } from "vitest";
import { escapeHtml, isSafeHref, markdownExcerpt, markdownToHtml, parseMarkdown, type MarkdownInline } from "@shared/markdown";

/** Every piece of markup in the tree, flattened (to check that text stays text). */
function flatten(nodes: MarkdownInline[]): MarkdownInline[] {
  return nodes.flatMap((n) => ("children" in n ? [n, ...flatten(n.children)] : [n]));
}

describe("markdown: inert input", () => {
  it("keeps a script element as literal text, escaped in HTML", () => {
    const source = 'Look <script>alert("x")</script> here';
    const [block] = parseMarkdown(source);
    expect(block).toEqual({ type: "paragraph", children: [{ type: "text", text: source }] });
    expect(markdownToHtml(source)).toBe("<p>Look &lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; here</p>");
  });

  it("escapes the five HTML-significant characters everywhere, also inside code and code blocks", () => {
    expect(escapeHtml(`&<>"'`)).toBe("&amp;&lt;&gt;&quot;&#39;");
    expect(markdownToHtml("`<b onclick='x'>`")).toBe("<p><code>&lt;b onclick=&#39;x&#39;&gt;</code></p>");
    expect(markdownToHtml("```\n<img src=x onerror=alert(1)>\n```")).toBe("<pre><code>&lt;img src=x onerror=alert(1)&gt;</code></pre>");
  });

  it("makes links only of http and https addresses", () => {
    expect(isSafeHref("https://example.org/a?b=1")).toBe(true);
    expect(isSafeHref("http://example.org")).toBe(true);
    for (const bad of ["javascript:alert(1)", "JAVASCRIPT:alert(1)", "data:text/html,<b>", "/relative", "//host.example", "vbscript:x", "https://a b"]) {
      expect(isSafeHref(bad), bad).toBe(false);
    }
    expect(markdownToHtml("[click](javascript:alert(1))")).toBe("<p>[click](javascript:alert(1))</p>");
    expect(markdownToHtml("[a paper](https://example.org/p)")).toBe('<p><a href="https://example.org/p" rel="nofollow noopener noreferrer">a paper</a></p>');
  });

  it("cannot break out of the link's attribute with a quote", () => {
    const html = markdownToHtml('[x](https://example.org/"onmouseover="alert(1))');
    expect(html).not.toContain('"onmouseover');
    expect(html).not.toMatch(/<a [^>]*onmouseover/);
  });

  it("never produces an element other than the ones it knows", () => {
    const html = markdownToHtml('<iframe src="https://evil.example"></iframe> **<b>x</b>** *<svg onload=alert(1)>*\n- <style>*{}</style>');
    const tags = [...html.matchAll(/<\/?([a-z0-9]+)/gi)].map((m) => m[1].toLowerCase());
    // The address inside the iframe's attribute is still an address: a plain http(s) link.
    expect(new Set(tags)).toEqual(new Set(["p", "a", "strong", "em", "ul", "li"]));
    expect(html).toContain('&lt;iframe src=&quot;<a href="https://evil.example" rel="nofollow noopener noreferrer">https://evil.example</a>&quot;&gt;');
  });
});

describe("markdown: formatting", () => {
  it("reads bold, italic, code and line breaks", () => {
    expect(markdownToHtml("**Gut traces** on *two* specimens, see `body_size`\nsecond line")).toBe(
      "<p><strong>Gut traces</strong> on <em>two</em> specimens, see <code>body_size</code><br>second line</p>",
    );
  });

  it("leaves lone or spaced markers as they are", () => {
    expect(markdownToHtml("2 * 3 * 4 and a ** b")).toBe("<p>2 * 3 * 4 and a ** b</p>");
    expect(markdownToHtml("snake_case_key stays")).toBe("<p>snake_case_key stays</p>");
    expect(markdownToHtml("\\*not italic\\*")).toBe("<p>*not italic*</p>");
  });

  it("nests italic inside bold", () => {
    const [block] = parseMarkdown("**very *thin* evidence**");
    expect(block).toEqual({
      type: "paragraph",
      children: [{ type: "strong", children: [{ type: "text", text: "very " }, { type: "em", children: [{ type: "text", text: "thin" }] }, { type: "text", text: " evidence" }] }],
    });
  });

  it("turns bare addresses into links without the sentence's closing punctuation", () => {
    expect(markdownToHtml("See https://example.org/x.")).toBe('<p>See <a href="https://example.org/x" rel="nofollow noopener noreferrer">https://example.org/x</a>.</p>');
  });

  it("reads unordered and ordered lists, with blank lines between blocks", () => {
    const source = "Two checks:\n\n- drawers of the invented collection\n- the channel-fill records\n  in the upper section\n\n3. first\n4. second";
    expect(markdownToHtml(source)).toBe(
      [
        "<p>Two checks:</p>",
        "<ul><li>drawers of the invented collection</li><li>the channel-fill records<br>in the upper section</li></ul>",
        '<ol start="3"><li>first</li><li>second</li></ol>',
      ].join("\n"),
    );
  });

  it("marks mentions of the given names only, preferring the longest name", () => {
    const names = ["Ada", "Ada Stone", "Bo Reed"];
    const [block] = parseMarkdown("@Ada Stone and @Bo Reed, not @Carl or mail@Ada", { mentionNames: names });
    expect(block.type === "paragraph" && block.children).toEqual([
      { type: "mention", name: "Ada Stone" },
      { type: "text", text: " and " },
      { type: "mention", name: "Bo Reed" },
      { type: "text", text: ", not @Carl or mail@Ada" },
    ]);
  });

  it("keeps text inside formatting as text nodes only", () => {
    const blocks = parseMarkdown("**<b>x</b>** [<i>y</i>](https://example.org)");
    const nodes = blocks.flatMap((b) => (b.type === "paragraph" ? flatten(b.children) : []));
    const texts = nodes.filter((n) => n.type === "text").map((n) => (n as { text: string }).text);
    expect(texts).toContain("<b>x</b>");
    expect(texts).toContain("<i>y</i>");
  });
});

describe("markdown: excerpt", () => {
  it("drops the markers and cuts long text with an ellipsis", () => {
    expect(markdownExcerpt("**Bold** and [a link](https://example.org)\n- one\n- two")).toBe("Bold and a link (https://example.org) • one • two");
    const long = "word ".repeat(100);
    const excerpt = markdownExcerpt(long, 40);
    expect(excerpt.length).toBeLessThanOrEqual(40);
    expect(excerpt.endsWith("…")).toBe(true);
  });
});
