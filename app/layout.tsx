import type { Metadata } from 'next';
import './globals.css';
import 'katex/dist/katex.min.css';
import { textFont, figureFont } from './fonts';
import { SiteHeader } from '@/components/site-header';

export const metadata: Metadata = {
  title: { default: 'Oscillab', template: '%s · Oscillab' },
  description: 'Marking and feedback for vibrational spectroscopy practicals',
};

export default function RootLayout({ children }: { children: React.ReactNode }) {
  return (
    <html lang="en-GB" className={`${textFont.variable} ${figureFont.variable}`}>
      <body className="min-h-screen">
        <a
          href="#main"
          className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:bg-paper-raised focus:p-2"
        >
          Skip to content
        </a>
        <SiteHeader />
        <main id="main" className="mx-auto min-w-0 max-w-6xl px-4 py-6 sm:px-5">
          {children}
        </main>
      </body>
    </html>
  );
}
