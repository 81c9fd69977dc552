"""The CSS cascade of an SVG file: which paint properties each element ends up with.

Stylesheets (``<style>`` elements) are tokenised by tinycss2 and their selectors
compiled and matched by cssselect2, the W3C Selectors Level 4 engine that works
directly on ElementTree (so it runs over the tree defusedxml parsed, and nothing is
re-parsed by another XML library). Every selector the engine knows applies:
descendant, child and sibling combinators, attribute selectors, ``:not()``,
structural pseudo-classes.

Cascade, lowest first (SVG 2 §6.3, CSS Cascading 4 §6): presentation attributes,
then stylesheet rules in order of specificity and then of appearance, then the
``style`` attribute; ``!important`` declarations beat all normal ones (rules by
specificity, then ``style``). Inheritance is the caller's.

Limits against hostile stylesheets, each a named setting: the number of selectors,
the descendant/sibling combinators in one selector (each can make a match walk all
ancestors again), and the number of selector tests the whole match may make.
"""

from __future__ import annotations

from ..errors import ReadError

__all__ = ["PROPS", "MAX_CSS_SELECTORS", "MAX_CSS_SLOW_COMBINATORS", "MAX_CSS_TESTS", "Cascade"]

#: The properties the paint reader uses; every other declaration is ignored.
PROPS = frozenset({"fill", "stroke", "fill-opacity", "stroke-opacity", "color", "stroke-width", "visibility",
                   "font-size", "opacity", "display", "stop-color", "stop-opacity"})
#: A chart's stylesheet has a few to a few hundred selectors; more is refused
#: (practical limit, no source: a 1 000-rule sheet took minutes with the old matcher).
MAX_CSS_SELECTORS = 2_000
#: Descendant (" ") and general-sibling ("~") combinators allowed in one selector;
#: each may rescan every ancestor, so n of them cost up to depth^n tests. Selectors
#: with more are skipped with a note (practical limit, no source).
MAX_CSS_SLOW_COMBINATORS = 3
#: Selector tests allowed for a whole file: the candidate selectors (those whose
#: rightmost id, class or tag fits) summed over every element, counted before any
#: matching (practical limit, no source: about 2 s of matching at most).
MAX_CSS_TESTS = 1_500_000


def _slow_combinators(tree) -> int:
    n = 0
    while tree is not None and hasattr(tree, "combinator"):
        n += tree.combinator in (" ", "~")
        tree = tree.left
    return n


def _declarations(tokens) -> list:
    """``[(name, value, important)]`` of the paint properties in a declaration list."""
    import tinycss2

    out = []
    for d in tinycss2.parse_blocks_contents(tokens, skip_whitespace=True, skip_comments=True):
        if d.type == "declaration" and d.lower_name in PROPS:
            out.append((d.lower_name, tinycss2.serialize(d.value).strip(), bool(d.important)))
    return out


class Cascade:
    """Own (not inherited) paint properties of each element of one SVG tree."""

    def __init__(self, root, path, style_texts: list[str], notes: list[str]):
        self.path, self.notes = path, notes
        self.matcher, self.wrappers = None, {}
        self._style_cache: dict[str, list] = {}
        self._own: dict[int, dict] = {}
        if not any(t.strip() for t in style_texts):
            return
        import cssselect2
        import tinycss2
        from cssselect2 import parser as selector_parser

        matcher = cssselect2.Matcher()
        count = skipped = at_rules = 0
        pending = [tinycss2.parse_stylesheet(t, skip_whitespace=True, skip_comments=True) for t in style_texts]
        while pending:
            for rule in pending.pop(0):
                if rule.type == "at-rule":
                    media = tinycss2.serialize(rule.prelude).strip().lower()
                    if rule.lower_at_keyword == "media" and rule.content is not None \
                            and media in ("", "all", "screen"):
                        pending.append(tinycss2.parse_blocks_contents(rule.content, skip_whitespace=True,
                                                                      skip_comments=True))
                    elif rule.lower_at_keyword not in ("namespace", "charset", "font-face", "import"):
                        at_rules += 1
                    continue
                if rule.type != "qualified-rule":
                    continue
                decls = _declarations(rule.content)
                try:
                    compiled = list(cssselect2.compile_selector_list(rule.prelude))
                    parsed = list(selector_parser.parse(rule.prelude))
                except cssselect2.SelectorError:
                    skipped += 1
                    continue
                count += len(compiled)
                if count > MAX_CSS_SELECTORS:
                    raise ReadError(f"{path}: refused: the stylesheet has more than {MAX_CSS_SELECTORS} "
                                    f"selectors (limit MAX_CSS_SELECTORS)")
                if not decls:
                    continue
                for sel, tree in zip(compiled, parsed):
                    if sel.pseudo_element is not None:
                        continue
                    if _slow_combinators(tree.parsed_tree) > MAX_CSS_SLOW_COMBINATORS:
                        skipped += 1
                        continue
                    matcher.add_selector(sel, decls)
        if skipped:
            notes.append(f"{skipped} CSS selector(s) were skipped (invalid, or more than "
                         f"{MAX_CSS_SLOW_COMBINATORS} descendant/sibling combinators)")
        if at_rules:
            notes.append(f"{at_rules} CSS at-rule(s) other than @media screen/all were not applied")
        self.matcher = matcher
        wrapper = cssselect2.ElementWrapper.from_xml_root(root)
        self.wrappers = {id(w.etree_element): w for w in wrapper.iter_subtree()}
        m = matcher
        self._keyed = (m.id_selectors, m.class_selectors, m.lower_local_name_selectors, m.namespace_selectors)
        self._others = len(m.other_selectors) + len(m.lang_attr_selectors)
        tests = sum(self._candidates(w) for w in self.wrappers.values())
        if tests > MAX_CSS_TESTS:  # counted before any matching: refused at once
            raise ReadError(f"{path}: refused: applying the stylesheet would take {tests} selector tests, "
                            f"more than the {MAX_CSS_TESTS} allowed (limit MAX_CSS_TESTS)")

    def _candidates(self, w) -> int:
        ids, classes, names, spaces = self._keyed
        n = self._others + len(ids.get(w.id, ())) + len(spaces.get(w.namespace_url, ()))
        n += len(names.get(w.local_name.lower(), ()))
        return n + sum(len(classes.get(c, ())) for c in w.classes)

    def _style_attr(self, text: str) -> list:
        got = self._style_cache.get(text)
        if got is None:
            import tinycss2

            got = _declarations(tinycss2.parse_component_value_list(text))
            if len(self._style_cache) < 10_000:
                self._style_cache[text] = got
        return got

    def own(self, el) -> dict:
        """The element's own properties after the cascade (values as written)."""
        key = id(el)
        got = self._own.get(key)
        if got is not None:
            return got
        style = {k: el.get(k).strip() for k in PROPS if el.get(k) is not None}
        important = {}
        w = self.wrappers.get(key) if self.matcher is not None else None
        if w is not None:
            for _spec, _order, _pseudo, decls in self.matcher.match(w):
                for name, value, imp in decls:
                    (important if imp else style)[name] = value
        text = el.get("style")
        if text:
            later = {}
            for name, value, imp in self._style_attr(text):
                (later if imp else style)[name] = value
                if imp:
                    important.pop(name, None)
            style.update(important)
            style.update(later)
        else:
            style.update(important)
        self._own[key] = style
        return style
