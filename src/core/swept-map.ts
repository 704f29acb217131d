/**
 * A map whose entries live as long as analyses use them: the editor's worker keeps one per file
 * for each thing it reuses across keystrokes (anchors, local re-checks, each mirror's findings,
 * parses, solved reports). `begin` starts an analysis, `get` and `set` mark an entry used by it,
 * and `sweep` after it drops every entry it did not use — so a file's caches hold what its last
 * analysis read, never a history of every edit.
 */
export class SweptMap<K, V> {
  private readonly entries = new Map<K, { value: V; used: number }>();
  /** Counts analyses (`begin`). */
  generation = 0;

  /** Starts an analysis: what it does not use is dropped by the next `sweep`. */
  begin(): void {
    this.generation++;
  }

  /** The entry, marked used by this analysis. */
  get(key: K): V | undefined {
    const e = this.entries.get(key);
    if (!e) return undefined;
    e.used = this.generation;
    return e.value;
  }

  /** The entry without marking it: a look that keeps nothing alive. */
  peek(key: K): V | undefined {
    return this.entries.get(key)?.value;
  }

  set(key: K, value: V): void {
    this.entries.set(key, { value, used: this.generation });
  }

  delete(key: K): void {
    this.entries.delete(key);
  }

  /** Drops every entry the last analysis did not use. */
  sweep(): void {
    // forEach, not for…of: no [key, value] pair is made per entry (a 500-mirror file holds thousands).
    this.entries.forEach((e, k) => { if (e.used !== this.generation) this.entries.delete(k); });
  }

  get size(): number {
    return this.entries.size;
  }
}
