import { InputError } from '../errors.js';
import { annotationsFrom, type Annotations } from '../options/annotation-options.js';

/**
 * `--label` and `--note` of a command that stores a run; refused with `--no-store`, where
 * they would be silently lost.
 */
export function storedAnnotations(values: { label?: string[]; note?: string; 'no-store'?: boolean }): Annotations {
  const annotations = annotationsFrom(values);
  if (values['no-store'] && (Object.keys(annotations.labels).length > 0 || annotations.note !== null)) {
    throw new InputError(values.note !== undefined ? '--note' : '--label', 'labels and notes are kept with the stored run: leave out --no-store');
  }
  return annotations;
}

/** The annotations a run was just created with, as its record will hold them. */
export function annotationRecord(annotations: Annotations, addedAt = new Date().toISOString()) {
  return { labels: annotations.labels, notes: annotations.note === null ? [] : [{ addedAt, text: annotations.note }] };
}
