/** Jest runs the shared (pure), simulator and server tests; components run under `ng test`, browsers under test/e2e. */
module.exports = {
  testEnvironment: 'node',
  roots: ['<rootDir>/test'],
  testMatch: ['**/*.test.ts'],
  testPathIgnorePatterns: ['/node_modules/', '/test/e2e/', '/test/bench/'],
  transform: { '^.+\\.ts$': ['ts-jest', { tsconfig: 'tsconfig.server.json' }] },
  testTimeout: 60000,
};
