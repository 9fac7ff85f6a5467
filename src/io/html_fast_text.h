// Internal: a fast path for the text of an HTML document (io/html_text.h
// states the definition), which gives the same text as the reference
// parser (Gumbo 0.10.1) on the documents it accepts and declines the rest.
//
// It is an HTML5 tokenizer (WHATWG HTML Standard, section 13.2.5: data,
// tag open, end tag open, tag name, the attribute states, markup
// declarations, comments, DOCTYPE, bogus comments, CDATA sections in
// foreign content, character references; RCDATA for title and textarea;
// RAWTEXT for style, xmp, iframe, noembed and noframes; script data with
// its escaped states for script; noscript parsed as markup, as with
// scripting disabled, which is what the reference does) and the part of
// tree construction (section 13.2.6) that decides the text: the insertion
// modes initial through "in body", "in table", "in column group", "in
// table body", "in row" and "in cell"; the stack of open elements with its
// scopes; implied end tags; the list of active formatting elements and its
// reconstruction; the adoption agency algorithm (on the stack and the
// list; see html_tree_adoption.cc for when the moves it makes leave the
// text in order); the form element pointer; and the content of svg and
// math, which is skipped, up to its end. Where the reference departs from
// the standard, the fast path follows the reference: an end tag of an
// unknown name closes the nearest unknown element whatever its name, main
// is not "special", the end tags of applet, marquee and object look in the
// table scope, and text directly in a form that follows its last element
// or comment comes after the form.
//
// It declines (returns false) where the tree's shape needs more of the
// algorithm than that, or where the reference's behaviour is not
// modelled: text or misplaced elements directly inside a table (foster
// parenting; also inputs other than type=hidden), caption, a misnesting
// that moves a block or skipped element, a fourth identical formatting
// element (Noah's Ark compares attributes), template, select, frameset,
// plaintext, isindex, menuitem, keygen, the ruby parts rb/rp/rt/rtc,
// MathML and SVG names used as HTML elements, HTML elements or breakouts
// inside svg or math, a </form> whose form is not the current node, a
// table start tag under an open p when the DOCTYPE is neither
// "<!DOCTYPE html>" nor absent (quirks mode then decides), a character
// reference or NUL before the body starts, an unknown, svg or math tag
// right after "</>", tag names with controls or non-ASCII bytes, input
// that is not valid UTF-8, and documents nested more deeply than a guard.
//
// Thread-safety: a plain function.
#ifndef KINDRED_IO_HTML_FAST_TEXT_H_
#define KINDRED_IO_HTML_FAST_TEXT_H_

#include <string>

#include "absl/strings/string_view.h"

namespace kindred::io {

// Sets *out (cleared first) to the text of `html` and returns true, or
// returns false (leaving *out unspecified) when the document is outside
// the fast path's scope; *reason (when not null) then names why, in words.
// `valid_utf8` promises that `html` is well-formed UTF-8 (else it is
// checked, and declined if not).
bool FastHtmlToText(absl::string_view html, std::string* out, const char** reason = nullptr,
                    bool valid_utf8 = false);

}  // namespace kindred::io

#endif  // KINDRED_IO_HTML_FAST_TEXT_H_
