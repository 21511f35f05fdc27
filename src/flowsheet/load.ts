/**
 * Reading a flowsheet, for library users: a file (or a text) in, a frozen model out, or an
 * InputError holding every problem with its position.
 */
import type { LoadedFile } from './model.js';
import * as validation from './validate.js';

/** Reads and validates a flowsheet file. Throws InputError with every problem found. */
export function loadFlowsheet(path: string): LoadedFile {
  return validation.loadFlowsheet(path);
}

/** Validates a flowsheet given as text (`path` names it in messages). Throws InputError. */
export function validateText(path: string, text: string): LoadedFile {
  return validation.validateText(path, text);
}
