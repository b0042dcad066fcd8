import { z } from 'zod';
import { machineProfileSchema, materialProfileSchema } from '../types/profiles';

/** What the server adds to a stored profile. */
export const storedFieldsSchema = z.object({ id: z.string(), labId: z.string(), createdAt: z.string(), updatedAt: z.string() });
export type Stored<P> = P & z.infer<typeof storedFieldsSchema>;

/** A machine or material as the API answers it: the profile plus its stored fields. */
export const machineViewSchema = z.object({ ...machineProfileSchema.shape, ...storedFieldsSchema.shape });
export const materialViewSchema = z.object({ ...materialProfileSchema.shape, ...storedFieldsSchema.shape });
export type MachineView = z.infer<typeof machineViewSchema>;
export type MaterialView = z.infer<typeof materialViewSchema>;
