// Konva needs a canvas; happy-dom has none (it crashes on load without one; vitest-canvas-mock supplies it).
import 'vitest-canvas-mock';
