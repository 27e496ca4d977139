import type { Role } from '@/lib/auth/roles';
import 'next-auth';
import 'next-auth/jwt';

declare module 'next-auth' {
  interface Session {
    user: { id: number; name: string; email: string; role: Role };
  }
}

declare module 'next-auth/jwt' {
  interface JWT {
    id?: number;
    role?: Role;
  }
}
