/** Recent values up to a total weight, the least recently used dropped first. */
export class BoundedCache<T> {
  private readonly entries = new Map<string, { value: T; weight: number }>();
  private total = 0;

  constructor(
    private readonly budget: number,
    private readonly weigh: (value: T) => number,
  ) {}

  get(key: string): T | undefined {
    const entry = this.entries.get(key);
    if (!entry) return undefined;
    this.entries.delete(key);
    this.entries.set(key, entry);
    return entry.value;
  }

  set(key: string, value: T): T {
    const weight = this.weigh(value);
    if (weight > this.budget || this.entries.has(key)) return value;
    while (this.total + weight > this.budget) {
      const [oldest, entry] = this.entries.entries().next().value!;
      this.entries.delete(oldest);
      this.total -= entry.weight;
    }
    this.entries.set(key, { value, weight });
    this.total += weight;
    return value;
  }

  /** Drop every value. */
  clear(): void {
    this.entries.clear();
    this.total = 0;
  }

  /** How many values are held. */
  get size(): number {
    return this.entries.size;
  }
}
