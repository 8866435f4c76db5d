/** A count with its noun in the right number: "1 teacher", "2 teachers", "0 classes". The one way counts are written. */
export function plural(n: number, one: string, many = `${one}s`) {
  return `${n} ${n === 1 ? one : many}`;
}
