// The one focus ring of the app: visible for keyboard users, in the accent colour.
export const focusRing =
  "focus-visible:outline-none focus-visible:ring-2 focus-visible:ring-accent-500 focus-visible:ring-offset-2 focus-visible:ring-offset-white";
