// Preloaded by the bench into every system it measures (Holdline and both relays, with
// --expose-gc): SIGUSR2 runs a full garbage collection, so memory is read on live objects rather
// than on whatever garbage a collection has not reached yet (module loading, join answers).
// SIGUSR1 is Node's inspector signal; SIGUSR2 is unused by Holdline and the relays.
process.on('SIGUSR2', () => {
  globalThis.gc?.();
});
