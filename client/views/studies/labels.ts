/**
 * A study runs as a background job like a slotting run, with the same states and the same words for
 * them: one wording, kept with the slotting screens.
 */
export { RUN_STATUS_LABEL as STATUS_LABEL, RUN_STATUS_TYPE as STATUS_TYPE } from '../slotting/labels';
