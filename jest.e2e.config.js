// Browser tests: the real server (a child process on a free port, fresh data directory) driven by
// Debian's Chromium through playwright-core. Run after the web export (scripts/test.sh does both).
module.exports = {
  displayName: 'e2e',
  testEnvironment: 'node',
  testMatch: ['<rootDir>/tests/e2e/**/*.e2e.ts'],
  moduleNameMapper: { '^@/(.*)$': '<rootDir>/$1' },
  transform: { '\\.[jt]sx?$': 'babel-jest' },
  testTimeout: 180_000,
  maxWorkers: 1,
  // Keep-alive sockets of Node's fetch can hold the process a few seconds after the last test.
  forceExit: true,
};
