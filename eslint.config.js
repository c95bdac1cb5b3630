import { readdirSync } from "node:fs";
import js from "@eslint/js";
import tseslint from "typescript-eslint";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";

// Layering, kept by the linter (docs/architecture.md, "Layers"). Imports are matched as written,
// so each rule names the relative climb that would leave its layer.
const LAYER_MESSAGE = "breaks the layering in docs/architecture.md";

/** shared/ is pure and used by both sides: it imports nothing from the server, the client, the database or scripts. */
const sharedLayer = {
  files: ["shared/**/*.{ts,tsx}"],
  rules: {
    "no-restricted-imports": [
      "error",
      {
        patterns: [
          { regex: "^(\\.\\./)+(server|src|db|scripts|tests|bench)(/|$)", message: `shared/ imports only shared/ and packages: ${LAYER_MESSAGE}.` },
          { regex: "^@db(/|$)", message: `shared/ imports nothing from db/: ${LAYER_MESSAGE}.` },
        ],
      },
    ],
  },
};

/** db/ is the schema, migrations and the cluster scripts: nothing from the server, the client or the seed scripts. */
const dbLayer = {
  files: ["db/**/*.{ts,tsx}"],
  rules: {
    "no-restricted-imports": [
      "error",
      {
        patterns: [
          { regex: "^(\\.\\./)+(server|src|scripts|tests|bench)(/|$)", message: `db/ imports only db/, shared/ and packages: ${LAYER_MESSAGE}.` },
        ],
      },
    ],
  },
};

/**
 * Services and the domain errors they raise know nothing of HTTP: a service throws a DomainError
 * (server/domain/errors.ts) and server/http/errors.ts maps it to a status. Only the upload helpers
 * of server/http are shared with services, since multer hands them the stored file.
 */
const domainLayer = {
  files: ["server/services/**/*.{ts,tsx}", "server/domain/**/*.{ts,tsx}", "server/jobs/**/*.{ts,tsx}"],
  rules: {
    "no-restricted-imports": [
      "error",
      {
        patterns: [
          { regex: "^(\\.\\./)+(http|routes)(/|$)", message: `services raise domain errors and know no HTTP status or route: ${LAYER_MESSAGE}.` },
          { regex: "^(\\.\\./)+(src|scripts|tests|bench)(/|$)", message: `the server imports no client, script or test: ${LAYER_MESSAGE}.` },
        ],
      },
    ],
  },
};

/** src/components and src/lib serve every feature and so import none. */
const clientSharedLayer = {
  files: ["src/components/**/*.{ts,tsx}", "src/lib/**/*.{ts,tsx}"],
  rules: {
    "no-restricted-imports": [
      "error",
      { patterns: [{ regex: "(^|/)features(/|$)", message: `src/components and src/lib import no feature: ${LAYER_MESSAGE}.` }] },
    ],
  },
};

/**
 * A feature (src/features/<name>/) imports no other feature; what several screens read comes from
 * src/lib/queries and shared UI from src/components. One block per feature and folder depth, since
 * "../other" leaves the feature only from its top folder, "../../other" from one folder down.
 */
const FEATURES = readdirSync(new URL("./src/features", import.meta.url), { withFileTypes: true })
  .filter((entry) => entry.isDirectory())
  .map((entry) => entry.name);
const escapeRegex = (text) => text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
const featureLayers = FEATURES.flatMap((feature) =>
  [0, 1, 2].map((depth) => {
    const toFeatures = `^(\\.\\./){${depth + 1}}`; // climbs to src/features/
    const toSrc = `^(\\.\\./){${depth + 2}}features/`; // climbs to src/ and back into features/
    const notSelf = `(?!${escapeRegex(feature)}(/|$))`;
    return {
      files: [`src/features/${feature}/${"*/".repeat(depth)}*.{ts,tsx}`],
      rules: {
        "no-restricted-imports": [
          "error",
          {
            patterns: [
              { regex: `${toFeatures}${notSelf}[^./]`, message: `a feature imports no other feature: ${LAYER_MESSAGE}.` },
              { regex: `${toSrc}${notSelf}`, message: `a feature imports no other feature: ${LAYER_MESSAGE}.` },
            ],
          },
        ],
      },
    };
  }),
);

export default tseslint.config(
  { ignores: ["dist/", "node_modules/", ".data/", "db/migrations/", "coverage/", "test-results/", "cli/generated/"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/no-explicit-any": "off",
    },
  },
  {
    files: ["src/**/*.{ts,tsx}"],
    plugins: { "react-hooks": reactHooks },
    rules: reactHooks.configs.recommended.rules,
  },
  sharedLayer,
  dbLayer,
  domainLayer,
  clientSharedLayer,
  ...featureLayers,
);
