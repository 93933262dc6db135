/**
 * The signal code the records view needs only once a record is open (the
 * gather, the strongest-ridge seed and the ridge's picks): loaded on first
 * use, so it stays out of the app's first download.
 */
export { gatherOfRecording } from '../../../core/signal/gather';
export { ridgePicks, strongestRidgeSeed } from '../../../core/signal/ridge';
