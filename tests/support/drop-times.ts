/** Drop times for generated hand-ins, apart from the seeding so that benchmarks can import it before the app's modules. */
/** Ten drop times (s) for a student's hand-in; each later `attempt` is 0.02 s slower, so every version differs from the last. */
export function dropTimes(studentIndex: number, attempt = 0): number[] {
  return Array.from({ length: 10 }, (_, drop) =>
    Number((7.45 + (((studentIndex * 7 + drop * 3) % 11) - 5) * 0.01 + attempt * 0.02).toFixed(2)),
  );
}
