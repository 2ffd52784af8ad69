// What Modeshelf puts into next-auth's session and JWT: the account id and its role.
import type { Role } from '@/lib/roles';

declare module 'next-auth' {
  interface User {
    id: string;
    role: Role;
  }
  interface Session {
    user: { id: string; email: string; name: string; role: Role };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    role?: Role;
    name?: string | null;
    email?: string | null;
  }
}
