import type { Metadata, Viewport } from 'next';
import { inter } from './fonts';
import './globals.css';

export const metadata: Metadata = {
  title: { default: 'Fieldmark', template: '%s · Fieldmark' },
  description: 'Stallion semen morphology workbench for equine reproduction laboratories.',
  icons: { icon: { url: '/icon.svg', type: 'image/svg+xml' } },
  // A lab's private workbench: kept out of search engines (public/robots.txt says the same).
  robots: { index: false, follow: false },
};

export const viewport: Viewport = { width: 'device-width', initialScale: 1 };

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en" className={inter.variable}>
      <body className="min-h-screen font-sans">{children}</body>
    </html>
  );
}
