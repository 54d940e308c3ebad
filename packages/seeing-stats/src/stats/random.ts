/**
 * Seeded pseudo-random generator (mulberry32, a public-domain 32-bit generator by Tommy Ettinger):
 * the same seed gives the same stream, so bootstrap intervals and synthetic logs are reproducible.
 * Returns a function giving numbers in [0, 1). Example: createRandom(1)() → 0.6270739405881613.
 */
export function createRandom(seed: number): () => number {
  let state = seed >>> 0;
  return () => {
    state = (state + 0x6d2b79f5) >>> 0;
    let mixed = state;
    mixed = Math.imul(mixed ^ (mixed >>> 15), mixed | 1);
    mixed ^= mixed + Math.imul(mixed ^ (mixed >>> 7), mixed | 61);
    return ((mixed ^ (mixed >>> 14)) >>> 0) / 4294967296;
  };
}

/** A standard normal deviate from a uniform generator (Box–Muller transform). */
export function normalDeviate(random: () => number): number {
  const uniformA = 1 - random(); // in (0, 1], so the logarithm is finite
  const uniformB = random();
  return Math.sqrt(-2 * Math.log(uniformA)) * Math.cos(2 * Math.PI * uniformB);
}

/**
 * The stream of createRandom(seed) as an object that draws indices: nextIndex(count) is exactly
 * Math.floor(random() * count) for the next number random() would give, so a bootstrap that draws through it
 * makes the same draws as one through createRandom. It keeps the generator state in a field and returns small
 * integers, so a hot loop pays no closure call and no boxed number per draw.
 * Example: new RandomStream(1).nextIndex(10) → 6 (createRandom(1)() is 0.627…).
 */
export class RandomStream {
  private state: number;

  constructor(seed: number) {
    this.state = seed >>> 0;
  }

  nextIndex(count: number): number {
    const state = (this.state + 0x6d2b79f5) >>> 0;
    this.state = state;
    let mixed = state;
    mixed = Math.imul(mixed ^ (mixed >>> 15), mixed | 1);
    mixed ^= mixed + Math.imul(mixed ^ (mixed >>> 7), mixed | 61);
    return Math.floor((((mixed ^ (mixed >>> 14)) >>> 0) / 4294967296) * count);
  }
}
