export * from './gtin';
export * from './isni';
export * from './isrc';
export * from './isrc-allocation';
export * from './iswc';
export type { ParseResult } from './result';
