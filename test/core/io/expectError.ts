import { expect } from 'vitest';
import { FileFormatError } from '../../../src/core/io/errors.ts';

/** `fn` throws a FileFormatError whose message is exactly `message`; returns the error. */
export function expectFileError(fn: () => unknown, message: string): FileFormatError {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught, 'expected a FileFormatError').toBeInstanceOf(FileFormatError);
  expect((caught as Error).message).toBe(message);
  return caught as FileFormatError;
}
