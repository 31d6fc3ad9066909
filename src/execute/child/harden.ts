// Freezing everything a block can reach, so that no block (a hidden one above all) can change what another block's code means.
import vm from 'node:vm';

/** Objects already frozen with everything they reach; a frozen object cannot gain unfrozen parts later. */
const hardened = new WeakSet<object>();

const isReference = (value: unknown): value is object => (typeof value === 'object' && value !== null) || typeof value === 'function';

/**
 * Freeze `root` and everything reachable from it: own properties (data, getters and setters, symbol keys) and
 * prototypes. Typed arrays with elements cannot be frozen in JavaScript; the solver returns none, and such an
 * object anywhere else is an error here rather than a silently mutable value.
 */
export function freezeDeep<T>(root: T): T {
  const queue: object[] = [];
  const visit = (value: unknown) => {
    if (isReference(value) && !hardened.has(value)) {
      hardened.add(value);
      queue.push(value);
    }
  };
  visit(root);
  while (queue.length > 0) {
    const value = queue.pop()!;
    Object.freeze(value);
    visit(Object.getPrototypeOf(value));
    for (const key of Reflect.ownKeys(value)) {
      const descriptor = Object.getOwnPropertyDescriptor(value, key);
      if (!descriptor) continue;
      if ('value' in descriptor) visit(descriptor.value);
      else {
        visit(descriptor.get);
        visit(descriptor.set);
      }
    }
  }
  return root;
}

/** Intrinsics no global name leads to: the prototypes of async and generator functions, iterators and typed arrays. */
const HIDDEN_INTRINSICS = `[
  Object.getPrototypeOf(async function () {}),
  Object.getPrototypeOf(function* () {}),
  Object.getPrototypeOf(async function* () {}),
  Object.getPrototypeOf([][Symbol.iterator]()),
  Object.getPrototypeOf(new Map()[Symbol.iterator]()),
  Object.getPrototypeOf(new Set()[Symbol.iterator]()),
  Object.getPrototypeOf(''[Symbol.iterator]()),
  Object.getPrototypeOf(''.matchAll(/./g)),
  Object.getPrototypeOf(Int8Array),
  (function () { 'use strict'; return Object.getOwnPropertyDescriptor(arguments, 'callee').get; })(),
]`;

/**
 * The sandbox's own built-ins (its Math, Array.prototype, JSON, …) are not covered by --frozen-intrinsics, which
 * freezes the host's. Freeze them, and make every global the sandbox starts with read-only, so that
 * `Math.sqrt = …` or `globalThis.Math = …` fails instead of changing later blocks.
 */
export function hardenContext(context: vm.Context): void {
  const sandboxGlobal = vm.runInContext('globalThis', context) as Record<string, unknown>;
  // The global object itself stays open: each block's declarations are added to it.
  hardened.add(sandboxGlobal);
  for (const name of Object.getOwnPropertyNames(sandboxGlobal)) {
    const descriptor = Object.getOwnPropertyDescriptor(sandboxGlobal, name)!;
    if ('value' in descriptor && (descriptor.writable || descriptor.configurable)) {
      // A full descriptor: a partial one on a contextified global would drop the value.
      Object.defineProperty(sandboxGlobal, name, {
        value: descriptor.value,
        writable: false,
        enumerable: descriptor.enumerable ?? false,
        configurable: false,
      });
    }
    if ('value' in descriptor) freezeDeep(descriptor.value);
  }
  freezeDeep(vm.runInContext(HIDDEN_INTRINSICS, context));
}
