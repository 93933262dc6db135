/** The field app's store: import everything from here. */
export {
  openFieldStore,
  newSite,
  newPick,
  newEstimate,
  requestPersistentStorage,
  StoreError,
  type FieldStore,
  type IncomingOptions,
  type NewPickFields,
  type PersistenceAnswer,
  type SaveRecordingInput,
  type FieldStoreOptions,
  type SaveSiteOptions,
} from './field-store';
export { STORAGE_RESERVE_BYTES, type StorageEstimate } from './recordings';
export { pickOf } from './validate';
export { SCHEMA_VERSION, type OutboxEntry, type FieldDB, type FieldDBv1, type RecordingBytesEntry } from './schema';
export type {
  AnyRecord,
  EstimateRecord,
  PickRecord,
  SiteRecord,
  EstimateSettings,
  SiteLocation,
  RecordingRecord,
  RecordingGeometryJson,
} from '../../core/exchange/records';
