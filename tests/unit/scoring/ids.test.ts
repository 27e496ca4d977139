import { describe, expect, it } from 'vitest';
import { isUuidV4, newId } from '@/lib/scoring/types';

describe('mark ids', () => {
  it('recognises UUID v4 (RFC 9562 layout: version nibble 4, variant 8–b)', () => {
    expect(isUuidV4('6f1c1c1e-7c33-4a8e-9a43-0d6c2b8f0a01')).toBe(true);
    expect(isUuidV4('6f1c1c1e-7c33-1a8e-9a43-0d6c2b8f0a01')).toBe(false);
    expect(isUuidV4('6f1c1c1e-7c33-4a8e-7a43-0d6c2b8f0a01')).toBe(false);
    expect(isUuidV4('not-a-uuid')).toBe(false);
  });

  it('makes v4 ids from the platform crypto, or an injected source', () => {
    const a = newId();
    const b = newId();
    expect(isUuidV4(a)).toBe(true);
    expect(a).not.toBe(b);
    expect(newId({ randomUUID: () => 'fixed' })).toBe('fixed');
  });
});
