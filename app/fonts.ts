import localFont from 'next/font/local';

// Shipped with the app from the @fontsource-variable/inter package: no font is fetched at run time.
export const inter = localFont({
  src: '../node_modules/@fontsource-variable/inter/files/inter-latin-wght-normal.woff2',
  variable: '--font-inter',
  display: 'swap',
  weight: '100 900',
});
