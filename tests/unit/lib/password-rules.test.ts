import { describe, expect, it } from 'vitest';
import { MIN_PASSWORD_LENGTH, passwordSchema } from '@/lib/auth/password-rules';

describe('passwordSchema', () => {
  it(`needs at least ${MIN_PASSWORD_LENGTH} characters`, () => {
    const short = passwordSchema.safeParse('123456789');
    expect(short.success).toBe(false);
    expect(short.error?.issues[0].message).toBe('Password must be at least 10 characters.');
    expect(passwordSchema.safeParse('1234567890').success).toBe(true);
  });

  it('refuses more than 72 bytes, counting bytes, not characters (bcrypt reads 72 bytes)', () => {
    expect(passwordSchema.safeParse('a'.repeat(72)).success).toBe(true);
    expect(passwordSchema.safeParse('a'.repeat(73)).success).toBe(false);
    // 37 × 'ä' is 37 characters but 74 bytes in UTF-8.
    const wide = passwordSchema.safeParse('ä'.repeat(37));
    expect(wide.success).toBe(false);
    expect(wide.error?.issues[0].message).toMatch(/at most 72 bytes/);
  });
});
