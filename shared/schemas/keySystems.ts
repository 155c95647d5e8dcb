/** Key systems and keys as the API answers them. Bittings only on an audited reveal (records.ts says where). */
import { z } from 'zod';
import { Key, KeyOperatesRow, KeySystem } from './records';

export const KeySystemList = z.object({ keySystems: z.array(KeySystem) });
export type KeySystemList = z.infer<typeof KeySystemList>;
export const KeySystemAnswer = z.object({ keySystem: KeySystem });
export type KeySystemAnswer = z.infer<typeof KeySystemAnswer>;
export const KeyList = z.object({ keys: z.array(Key) });
export type KeyList = z.infer<typeof KeyList>;
/** The ids of the keys just added, in the order sent. */
export const KeyIds = z.object({ ids: z.array(z.uuid()) });
export type KeyIds = z.infer<typeof KeyIds>;
/** The cores a key turns, intended or incidental (the engine's keyOperates); no bitting. */
export const KeyOperatesList = z.object({ cores: z.array(KeyOperatesRow) });
export type KeyOperatesList = z.infer<typeof KeyOperatesList>;
/** The new key in a lost or worn-out key's place, the doors it serves and the cores that need rekeying. */
export const KeyReplacement = z.object({ id: z.uuid(), symbol: z.string(), doors: z.array(z.string()), coresToRekey: z.array(z.string()) });
export type KeyReplacement = z.infer<typeof KeyReplacement>;
