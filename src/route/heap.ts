/**
 * A binary min-heap of integer items keyed by numbers, for Dijkstra and A*.
 * Hand-written: a dozen lines, and no heap ships among our dependencies
 * (tinyqueue comes with turf, not as our own).
 */
export class MinHeap {
  private keys: number[] = [];
  private items: number[] = [];

  get size(): number {
    return this.items.length;
  }

  /**
   * @example const h = new MinHeap(); h.push(7, 2.5); h.pop() // 7
   */
  push(item: number, key: number): void {
    const { keys, items } = this;
    let i = items.length;
    keys.push(key);
    items.push(item);
    while (i > 0) {
      const up = (i - 1) >> 1;
      if (keys[up] <= key) break;
      keys[i] = keys[up];
      items[i] = items[up];
      i = up;
    }
    keys[i] = key;
    items[i] = item;
  }

  /**
   * The item with the smallest key, removed; -1 when empty.
   * @example new MinHeap().pop() // -1
   */
  pop(): number {
    const { keys, items } = this;
    if (items.length === 0) return -1;
    const top = items[0];
    const lastKey = keys.pop() as number;
    const lastItem = items.pop() as number;
    const n = items.length;
    if (n > 0) {
      let i = 0;
      for (;;) {
        let c = 2 * i + 1;
        if (c >= n) break;
        if (c + 1 < n && keys[c + 1] < keys[c]) c++;
        if (keys[c] >= lastKey) break;
        keys[i] = keys[c];
        items[i] = items[c];
        i = c;
      }
      keys[i] = lastKey;
      items[i] = lastItem;
    }
    return top;
  }
}
