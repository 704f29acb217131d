/** The end of an exhaustive switch over a closed union: the compiler proves it unreachable, so a
 *  new variant is a compile error at every switch that does not handle it. */
export function assertNever(x: never): never {
  throw new Error(`unhandled variant ${String(x)}`);
}
