import js from "@eslint/js";
import tseslint from "typescript-eslint";
import reactHooks from "eslint-plugin-react-hooks";
import nextPlugin from "@next/eslint-plugin-next";

// Layout rules of docs/architecture.md: app/ composes features; a feature imports shared, db
// and the public entry (index.ts, server/index.ts) of a feature below it — never one above it.
const featureOrder = [
  "shared",
  "dosing",
  "mail",
  "catalogue",
  "members",
  "reports",
  "photos",
  "review",
  "evidence",
  "exchange",
];

const below = (name) => featureOrder.slice(0, featureOrder.indexOf(name));

// The data layer is the only door: only features/*/server code (and db/ scripts, tests) touch the
// database, so every read and write goes through a function that checks its caller.
const dbOnlyInServer = {
  group: ["@/db", "@/db/*", "**/db/client", "**/db/schema", "**/db/schema/*"],
  message:
    "Only features/*/server, db/ and tests/ may import the database: call a feature's server function, which checks its caller.",
};

export default tseslint.config(
  { ignores: [".next/**", "node_modules/**", "drizzle/**", ".data/**", "next-env.d.ts", "tests/e2e/.artifacts/**"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  // The React Compiler-style rules included: where one needs a redesign, it is disabled on that line with its reason.
  // Only app and feature code is React; tests' helpers such as useBrowser() are not hooks.
  { ...reactHooks.configs.flat.recommended, files: ["app/**/*.{ts,tsx}", "features/**/*.{ts,tsx}"] },
  { ...nextPlugin.configs.recommended, files: ["app/**/*.{ts,tsx}", "features/**/*.{ts,tsx}"] },
  {
    files: ["app/**/*.{ts,tsx}", "features/**/*.{ts,tsx}"],
    rules: {
      // Photos are private: their route checks the viewer's session, which next/image's optimizer would not carry.
      "@next/next/no-img-element": "off",
    },
  },
  {
    files: ["**/*.{ts,tsx}"],
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      // Each remaining `any` carries an eslint-disable comment that says why.
      "@typescript-eslint/no-explicit-any": "error",
    },
  },
  ...featureOrder.flatMap((name) => {
    const patterns = [
      { group: ["@/app/*", "@/tests/*"], message: "Features never import app/ or tests/." },
      ...(name === "dosing"
        ? [
            {
              group: ["@/db/*", "node:*", "@/features/*"],
              message: "features/dosing is pure arithmetic: no I/O, no other feature.",
            },
          ]
        : []),
      ...featureOrder
        .filter((other) => other !== name && !below(name).includes(other))
        .map((other) => ({
          group: [`@/features/${other}`, `@/features/${other}/**`],
          message: `features/${name} sits below features/${other} and may not import it.`,
        })),
      ...below(name)
        .filter((other) => other !== "shared")
        .map((other) => ({
          regex: `^@/features/${other}/(?!index$|server$|server/index$|components/|auth-client$|starter-data$|api/)`,
          message: `Import features/${other} through its public entry (index.ts or server/index.ts).`,
        })),
    ];
    return [
      { files: [`features/${name}/server/**/*.{ts,tsx}`], rules: { "no-restricted-imports": ["error", { patterns }] } },
      {
        files: [`features/${name}/**/*.{ts,tsx}`],
        ignores: [`features/${name}/server/**`],
        rules: { "no-restricted-imports": ["error", { patterns: [...patterns, dbOnlyInServer] }] },
      },
    ];
  }),
  {
    files: ["app/**/*.{ts,tsx}", "*.{ts,tsx,mjs}"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [dbOnlyInServer],
          // Unchecked helpers that features use after their own check; a page or handler would skip it.
          paths: [
            {
              name: "@/features/reports/server",
              importNames: ["getReportRowById", "getVisibleReportRow", "recordEvent", "derive", "computeFlags"],
              message:
                "Unchecked report helper: call getReportById, getReportHistory or another function that takes the caller.",
            },
            {
              name: "@/features/mail/server",
              importNames: ["sendMail"],
              message: "Mail goes out from the feature that has checked its caller.",
            },
            {
              name: "@/features/photos/server",
              importNames: ["photoStorage", "DiskStorage"],
              message: "Photos are read through getPhotoFile, which checks the caller.",
            },
          ],
        },
      ],
    },
  },
  {
    // Client components never reach server code or the database.
    files: ["**/components/**/*.tsx", "**/*-client.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            {
              group: ["@/db/*", "@/features/*/server", "@/features/*/server/*", "node:*"],
              message: "Client code may not import server code or the database.",
            },
          ],
        },
      ],
    },
  },
  {
    files: ["db/schema/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        { patterns: [{ group: ["@/features/*"], message: "The schema stands alone." }] },
      ],
    },
  },
  {
    // File names are kebab-case.
    files: ["**/*.{ts,tsx}"],
    ignores: ["app/**/[[]*[]]/**", "app/**/\\(*\\)/**"],
    plugins: {
      local: {
        rules: {
          "kebab-case-files": {
            meta: { type: "suggestion", schema: [] },
            create(context) {
              const file = context.filename.split("/").pop() ?? "";
              const base = file.replace(/\.(test|e2e|config|d)?\.?(ts|tsx)$/, "").replace(/\.(test|e2e)$/, "");
              return {
                Program(node) {
                  if (!/^[a-z0-9]+(-[a-z0-9]+)*(\.[a-z0-9-]+)*$/.test(base)) {
                    context.report({ node, message: `File name "${file}" is not kebab-case.` });
                  }
                },
              };
            },
          },
        },
      },
    },
    rules: { "local/kebab-case-files": "error" },
  },
);
