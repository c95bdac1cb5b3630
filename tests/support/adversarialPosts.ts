// Thread posts built to make a markdown reader scan ahead again and again: long runs of openers
// that never close, closers, pairs, escapes, addresses that are almost valid, mentions. The unit
// test counts the reader's steps on them; `npm run bench` times them.

export interface AdversarialPost {
  name: string;
  /** The post at exactly `length` characters. */
  make(length: number): string;
}

/** `unit` repeated and cut to exactly `length` characters. */
const fill = (unit: string, length: number) => unit.repeat(Math.ceil(length / unit.length)).slice(0, length);

export const ADVERSARIAL_POSTS: AdversarialPost[] = [
  { name: "unclosed [", make: (n) => fill("[", n) },
  { name: "closers ]", make: (n) => fill("]", n) },
  { name: "labels without address [a](", make: (n) => fill("[a](", n) },
  { name: "links that share one closing ) [a](http://", make: (n) => fill("[a](http://", n - 1) + ")" },
  { name: "invalid addresses [a](http://[", make: (n) => fill("[a](http://[", n - 1) + ")" },
  { name: "escaped brackets \\[", make: (n) => fill("\\[", n) },
  { name: "stars *", make: (n) => fill("*", n) },
  { name: "italic pairs *a", make: (n) => fill("*a", n) },
  { name: "spaced stars * ", make: (n) => fill("* ", n) },
  { name: "bold openers **a", make: (n) => fill("**a", n) },
  { name: "italic around bold *a**", make: (n) => fill("*a**", n) },
  { name: "backticks `", make: (n) => fill("`", n) },
  { name: "unpaired backticks ` a", make: (n) => fill("` a", n) },
  { name: "underscores _", make: (n) => fill("_", n) },
  { name: "bare addresses (http://", make: (n) => fill("(http://", n) },
  { name: "address runs of 2,000 with invalid hosts", make: (n) => fill(`${fill("(http://[", 2000)} `, n) },
  { name: "mentions @Ad", make: (n) => fill("@Ad", n) },
  { name: "nested openers **[* then closers *]**", make: (n) => fill("**[*", n / 2) + fill("*]**", n - n / 2) },
  { name: "every marker **[*`_(http://a.b/[", make: (n) => fill("**[*`_(http://a.b/[", n) },
  { name: "lines of [", make: (n) => fill("[\n", n) },
];
