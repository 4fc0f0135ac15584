// Two projects: plain Node for the engine, the server and the database; jest-expo for components.
// Browser (end-to-end) tests have their own config, jest.e2e.config.js, run after the web export.
const esmPackages = ['jose', 'd3-[a-z]+', 'internmap', 'delaunator', 'robust-predicates'].join('|');

const shared = {
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
};

module.exports = {
  projects: [
    {
      ...shared,
      displayName: 'node',
      testEnvironment: 'node',
      testMatch: ['<rootDir>/tests/{sim,server,db,lib,scripts,hardening}/**/*.test.ts'],
      transform: {
        '[/\\\\]@electric-sql[/\\\\]pglite[/\\\\].+\\.c?js$': '<rootDir>/tests/helpers/pgliteTransform.js',
        '\\.[jt]sx?$': 'babel-jest',
      },
      transformIgnorePatterns: [`node_modules/(?!(${esmPackages}|@electric-sql/pglite)/)`],
    },
    {
      ...shared,
      displayName: 'components',
      // d3's packages ship ESM (.mjs) that jest-expo's transform does not pick up; their UMD builds load as they are.
      moduleNameMapper: { ...shared.moduleNameMapper, '^d3-(.*)$': '<rootDir>/node_modules/d3-$1/dist/d3-$1.js' },
      // Testing Library drives React Native's host components, so the component tests use the native
      // preset (the web preset renders DOM elements that its queries cannot see).
      preset: 'jest-expo/ios',
      testMatch: ['<rootDir>/tests/components/**/*.test.tsx'],
      transformIgnorePatterns: [
        `node_modules/(?!((jest-)?react-native|@react-native(-community)?|expo(nent)?|@expo(nent)?/.*|@expo-google-fonts/.*|react-navigation|@react-navigation/.*|react-native-svg|${esmPackages}))`,
      ],
    },
  ],
};
