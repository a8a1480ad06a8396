/** Append to the list kept under a key, making the list when the key is new (linear, unlike copying the list each time). Pure. */
export function pushTo<K, V>(map: Map<K, V[]>, key: K, value: V): void {
  const list = map.get(key);
  if (list) list.push(value);
  else map.set(key, [value]);
}
