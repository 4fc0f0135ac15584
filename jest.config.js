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
      testMatch: ['<rootDir>/tests/{sim,server,db,lib,scripts}/**/*.test.ts'],
      transform: {
        '[/\\\\]@electric-sql[/\\\\]pglite[/\\\\].+\\.c?js$': '<rootDir>/tests/helpers/pgliteTransform.js',
        '\\.[jt]sx?$': 'babel-jest',
      },
      transformIgnorePatterns: [`node_modules/(?!(${esmPackages}|@electric-sql/pglite)/)`],
    },
    {
      ...shared,
      displayName: 'components',
      preset: 'jest-expo/web',
      testMatch: ['<rootDir>/tests/components/**/*.test.tsx'],
      transformIgnorePatterns: [
        `node_modules/(?!((jest-)?react-native|@react-native(-community)?|expo(nent)?|@expo(nent)?/.*|@expo-google-fonts/.*|react-navigation|@react-navigation/.*|react-native-svg|${esmPackages}))`,
      ],
    },
  ],
};
