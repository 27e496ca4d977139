/** bcrypt cost for stored passwords; the dummy comparison for unknown accounts uses the same, so both take as long. */
export const PASSWORD_HASH_COST = 10;
