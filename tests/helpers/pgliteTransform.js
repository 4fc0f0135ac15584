// PGlite's CommonJS build loads Node built-ins with dynamic import(), which Jest refuses without
// --experimental-vm-modules. Rewriting those calls to a synchronous require keeps the real database
// in tests. The build declares its own `var require` in the same scope (hoisted, so undefined at
// that point), hence `module.require` rather than the bare name.
const crypto = require('crypto');

const pattern = /\bimport\((['"])([^'"]+)\1\)/g;

module.exports = {
  process(source) {
    return { code: source.replace(pattern, (_m, q, name) => `Promise.resolve(module.require(${q}${name}${q}))`) };
  },
  getCacheKey(source, filename) {
    return crypto.createHash('sha256').update('pglite-transform-v2').update(filename).update(source).digest('hex');
  },
};
