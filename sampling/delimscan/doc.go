// Package delimscan finds the separators and line ends of delimited
// text 64 bytes at a time: bit j of word i of a mask is set when byte
// 64·i + j is the byte looked for. A reader then walks records and fields
// with bit arithmetic (trailing zeros, population counts) instead of a
// test per byte. On x86-64 processors with AVX2 the masks are built with
// vector compares; elsewhere eight bytes at a time in a 64-bit word.
package delimscan
