// Minimal typings for the parts of cornerstone-core that Veil uses (the package ships none).
declare module 'cornerstone-core' {
  export interface CornerstoneImage {
    imageId: string;
    minPixelValue: number;
    maxPixelValue: number;
    slope: number;
    intercept: number;
    windowCenter: number;
    windowWidth: number;
    getPixelData(): Uint16Array;
    rows: number;
    columns: number;
    height: number;
    width: number;
    color: boolean;
    columnPixelSpacing: number;
    rowPixelSpacing: number;
    invert: boolean;
    sizeInBytes: number;
  }
  export interface Viewport {
    scale: number;
    translation: { x: number; y: number };
    voi: { windowWidth: number; windowCenter: number };
    invert: boolean;
  }
  export function registerImageLoader(scheme: string, loader: (imageId: string) => { promise: Promise<CornerstoneImage> }): void;
  export function enable(element: HTMLElement): void;
  export function disable(element: HTMLElement): void;
  export function loadImage(imageId: string): Promise<CornerstoneImage>;
  export function displayImage(element: HTMLElement, image: CornerstoneImage, viewport?: Partial<Viewport>): void;
  export function getViewport(element: HTMLElement): Viewport | undefined;
  export function setViewport(element: HTMLElement, viewport: Viewport): void;
  export function resize(element: HTMLElement, fitToWindow?: boolean): void;
  export function fitToWindow(element: HTMLElement): void;
  const cornerstone: {
    registerImageLoader: typeof registerImageLoader; enable: typeof enable; disable: typeof disable;
    loadImage: typeof loadImage; displayImage: typeof displayImage; getViewport: typeof getViewport;
    setViewport: typeof setViewport; resize: typeof resize; fitToWindow: typeof fitToWindow;
  };
  export default cornerstone;
}
