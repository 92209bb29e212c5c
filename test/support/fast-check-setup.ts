import fc from 'fast-check';

// Property tests explore fresh random cases on developers' machines; in CI
// (CI=true) they run with one fixed seed, so a landing never hangs on a case
// nobody has seen. Set FC_SEED to replay a failure fast-check reported.
const seed = process.env.FC_SEED ? Number(process.env.FC_SEED) : process.env.CI ? 20261201 : undefined;
if (seed !== undefined) fc.configureGlobal({ seed });
