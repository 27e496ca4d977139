'use client';

import Link from 'next/link';
import { usePathname } from 'next/navigation';
import type { NavItem } from '@/lib/auth/roles';

export function NavLinks({ items }: { items: NavItem[] }) {
  const path = usePathname();
  return (
    <ul className="flex flex-wrap gap-1">
      {items.map((item) => {
        const current = path === item.href || path.startsWith(`${item.href}/`);
        return (
          <li key={item.href}>
            <Link
              href={item.href}
              aria-current={current ? 'page' : undefined}
              className={`block rounded-md px-3 py-1.5 text-sm no-underline hover:bg-paper-sunk hover:no-underline ${current ? 'bg-brand-light font-medium text-brand-dark' : 'text-ink-soft'}`}
            >
              {item.label}
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
