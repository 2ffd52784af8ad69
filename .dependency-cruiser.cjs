// The import rules of DEVELOPERS.md ("What may import what"), checked by dependency-cruiser.
// `npm run check:deps` runs it; `npm test` runs it as one of its steps. A rule here that fails names the
// importing file, the imported one and the rule; fix the import (move the shared piece down a layer), not
// the rule.
/** @type {import('dependency-cruiser').IConfiguration} */
module.exports = {
  forbidden: [
    {
      name: 'no-import-cycles',
      severity: 'error',
      comment:
        'Modules import each other in a circle. Move what both need into a third module that imports neither.',
      from: {},
      to: { circular: true },
    },
    {
      name: 'engine-imports-nothing-of-ours',
      severity: 'error',
      comment:
        'reduction/ is the framework-free engine: it imports only reduction/ and Node built-ins, never app/, lib/, components/, db/, scripts/ or tests/.',
      from: { path: '^reduction/' },
      to: { pathNot: ['^reduction/', '(^|/)node_modules/'], dependencyTypesNot: ['core'], couldNotResolve: false },
    },
    {
      name: 'engine-imports-no-framework',
      severity: 'error',
      comment: 'reduction/ runs without React, Next.js or the database: no react, next, knex or pg.',
      from: { path: '^reduction/' },
      to: { path: '(^|/)node_modules/(react|react-dom|next|next-auth|knex|pg|pg-boss)/' },
    },
    {
      name: 'lib-imports-no-ui',
      severity: 'error',
      comment:
        'lib/ holds the server-side services; pages and components call it, never the other way round. Move the shared piece into lib/.',
      from: { path: '^lib/' },
      to: { path: '^(app|components)/' },
    },
    {
      name: 'pages-and-routes-do-not-touch-the-database',
      severity: 'error',
      comment:
        'A page or a route handler reads and writes through a function in the right lib/ module, never lib/db.ts or Knex directly.',
      from: { path: ['^app/(route|page)\\.tsx?$', '^app/.*/(route|page)\\.tsx?$'] },
      to: { path: ['^lib/db\\.ts$', '(^|/)node_modules/(knex|pg)/'] },
    },
    {
      name: 'components-do-not-touch-the-database',
      severity: 'error',
      comment: 'Components call lib/ functions; they never import lib/db.ts or Knex.',
      from: { path: '^components/' },
      to: { path: ['^lib/db\\.ts$', '(^|/)node_modules/(knex|pg)/'] },
    },
    {
      name: 'not-to-unresolvable',
      severity: 'error',
      comment: 'An import that resolves to nothing: a typo, a moved file, or a package missing from package.json.',
      from: {},
      to: { couldNotResolve: true },
    },
  ],
  options: {
    // The folders npm run check:deps names are cruised; node_modules is looked at only as a target, never
    // followed. (No includeOnly: it would also hide imports that resolve to nothing.)
    exclude: { path: '^(\\.next|\\.next-test|node_modules/\\.cache)/|^reduction/native/build/' },
    doNotFollow: {
      path: 'node_modules/',
      dependencyTypes: ['npm', 'npm-dev', 'npm-optional', 'npm-peer', 'npm-bundled', 'npm-no-pkg', 'npm-unknown'],
    },
    tsPreCompilationDeps: true,
    tsConfig: { fileName: 'tsconfig.json' },
    enhancedResolveOptions: {
      exportsFields: ['exports'],
      conditionNames: ['import', 'require', 'node', 'default', 'types'],
      extensions: ['.ts', '.tsx', '.d.ts', '.js', '.mjs', '.cjs', '.json'],
      mainFields: ['module', 'main', 'types', 'typings'],
    },
    skipAnalysisNotInRules: true,
    reporterOptions: { text: { highlightFocused: true } },
  },
};
