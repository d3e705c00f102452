import localFont from 'next/font/local';

// DejaVu Sans / Sans Mono (Bitstream Vera licence, see public/fonts/LICENSE-DejaVu.txt): they carry
// Greek letters and superscript digits and minus (ν μ ω ⁻ ¹ ²), which many web families lack.
export const textFont = localFont({
  src: [
    { path: '../public/fonts/DejaVuSans.ttf', weight: '400', style: 'normal' },
    { path: '../public/fonts/DejaVuSans-Bold.ttf', weight: '700', style: 'normal' },
  ],
  variable: '--font-text',
  display: 'swap',
});

export const figureFont = localFont({
  src: [{ path: '../public/fonts/DejaVuSansMono.ttf', weight: '400', style: 'normal' }],
  variable: '--font-figures',
  display: 'swap',
});
