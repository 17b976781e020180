// Konva needs a canvas; happy-dom has none (STACK.md, gotcha 7).
import 'vitest-canvas-mock';
