/** The profile's own fields, without the stored ones a PATCH may not carry. */
export function profileFields<P extends object>(profile: P): P {
  const { id: _id, labId: _labId, createdAt: _c, updatedAt: _u, ...rest } = profile as P & Record<string, unknown>;
  return rest as P;
}
