"""What the client makes of the daemon's rpc.discover document: method
attributes with signatures and docstrings (so ``help()`` shows each
parameter with its quantity kind, unit, default and bounds, and each
output), and the conversion of results to numpy arrays following each
result member's schema (QC flags as uint64, numbers as float64 with NaN
for null)."""
import inspect
import keyword

KEYWORDS = frozenset(keyword.kwlist)


def _deref(doc, node):
    """Resolves a "#/components/..." $ref (once per level)."""
    seen = 0
    while isinstance(node, dict) and "$ref" in node and seen < 16:
        ref = node["$ref"]
        if not ref.startswith("#/"):
            return node
        cur = doc
        for part in ref[2:].split("/"):
            cur = cur.get(part, {}) if isinstance(cur, dict) else {}
        node = cur
        seen += 1
    return node


def _ref_name(node):
    """The component name a schema points at ("qc", "outGrid"), through
    one allOf wrapper, or None."""
    if not isinstance(node, dict):
        return None
    if "$ref" in node:
        return node["$ref"].rsplit("/", 1)[-1]
    # allOf wraps one reference; anyOf's first alternative is the plain
    # answer (the others are its statistics under uncertainty)
    for sub in node.get("allOf", []) + node.get("anyOf", [])[:1]:
        r = _ref_name(sub)
        if r:
            return r
    return None


def _plain(schema):
    """(the schema of a plain value, True when a distribution may stand
    in its place): numbers of per-sample methods are
    {"anyOf": [number schema, distribution]}."""
    alts = schema.get("anyOf") if isinstance(schema, dict) else None
    if alts and any(_ref_name(a) == "distribution" for a in alts):
        rest = [a for a in alts if _ref_name(a) != "distribution"]
        if len(rest) == 1:
            return rest[0], True
    return schema, False


def _kind_text(schema, doc):
    """"number or array", "object (isoMedium)", "one of a, b" ... for a
    parameter's schema."""
    plain, dist = _plain(schema)
    if dist:
        return _kind_text(plain, doc) + " (or a distribution)"
    name = _ref_name(schema)
    s = _deref(doc, schema)
    if "oneOf" in s:
        alts = s["oneOf"]
        enums = [a for a in alts if "enum" in a]
        if enums:
            return "one of " + ", ".join(map(str, enums[0]["enum"])) + \
                (" (or an array of them)" if len(alts) > 1 else "")
        types = []
        for a in alts:
            t = a.get("type")
            types.append("array" if t == "array" else str(t))
        return " or ".join(dict.fromkeys(types))
    if "enum" in s:
        return "one of " + ", ".join(map(str, s["enum"]))
    t = s.get("type")
    if t == "object" or "properties" in s:
        return "object" + (" (%s)" % name if name else "")
    if t == "array":
        items = s.get("items", {})
        if "enum" in items:
            return "array of " + ", ".join(map(str, items["enum"]))
        return "array"
    return str(t) if t else "any JSON value"


def _bounds(schema):
    """"range [0, 90]" from minimum/maximum (inclusive or exclusive),
    looked for in the schema and its first alternative."""
    schema = _plain(schema)[0]
    cands = [schema] + list(schema.get("oneOf", []))
    for s in cands:
        lo = s.get("minimum", s.get("exclusiveMinimum"))
        hi = s.get("maximum", s.get("exclusiveMaximum"))
        if lo is None and hi is None:
            continue
        lb = "(" if "exclusiveMinimum" in s else "["
        hb = ")" if "exclusiveMaximum" in s else "]"
        return "range %s%s, %s%s" % (lb, "-inf" if lo is None else lo,
                                     "inf" if hi is None else hi, hb)
    return None


def _object_members(schema, doc, indent):
    s = _deref(doc, schema)
    props = s.get("properties")
    if not isinstance(props, dict):
        return []
    req = set(s.get("required", []))
    out = []
    for k, v in props.items():
        v2 = _deref(doc, v)
        bits = []
        kind = v.get("x-kind", v2.get("x-kind"))
        if kind and kind != "none":
            bits.append("%s, %s" % (kind, v.get("x-unit",
                                                v2.get("x-unit", "?"))))
        if k in req:
            bits.append("required")
        desc = v.get("description", v2.get("description", ""))
        if not desc:
            desc = _kind_text(v, doc)
        out.append("%s%s%s: %s" % (" " * indent, k,
                                   " [%s]" % "; ".join(bits) if bits else "",
                                   desc))
    return out


def method_doc(m, doc):
    """The docstring of one method from its rpc.discover entry."""
    lines = [m["name"] + ": " + m.get("summary", ""), ""]
    if m.get("description"):
        lines += [m["description"], ""]
    lines += ["Parameters (keyword; a Python keyword takes a trailing "
              "underscore, e.g. lambda_):"]
    for p in m.get("params", []):
        s = p.get("schema", {})
        head = "  %s : %s" % (p["name"], _kind_text(s, doc))
        extra = []
        if s.get("x-kind"):
            extra.append("%s in %s" % (s["x-kind"], s.get("x-unit", "?")))
        if p.get("required"):
            extra.append("required")
        if "default" in s:
            extra.append("default %r" % (s["default"],))
        b = _bounds(s)
        if b:
            extra.append(b)
        if s.get("x-broadcast-group"):
            extra.append("broadcast dimension %d" % s["x-broadcast-group"])
        if extra:
            head += " [" + "; ".join(extra) + "]"
        lines.append(head)
        desc = p.get("description") or s.get("description")
        if desc:
            lines.append("      " + desc)
        lines += _object_members(s, doc, 6)
    res = _deref(doc, (m.get("result") or {}).get("schema", {}))
    props = res.get("properties")
    if isinstance(props, dict) and props:
        lines += ["", "Returns a dict with:"]
        for k, v in props.items():
            unit = v.get("x-unit")
            ref = _ref_name(v)
            kind = " (QC flags, uint64)" if ref in ("qc", "qcGrid") else ""
            lines.append("  %s%s%s: %s" % (k, " [%s]" % unit if unit else "",
                                           kind, v.get("description", "")))
    lines += ["", "Screening estimates only: not a substitute for qualified "
              "review, local regulations and licensed practice; never the "
              "sole basis for well-control decisions."]
    return "\n".join(lines)


def signature(m):
    """A keyword-only signature for help(): required parameters without a
    default, the others with the schema's default (or None)."""
    ps = []
    for p in m.get("params", []):
        name = p["name"]
        if name in KEYWORDS or not name.isidentifier():
            name = name + "_"
            if not name.isidentifier():
                continue
        s = p.get("schema", {})
        dflt = inspect.Parameter.empty if p.get("required") else \
            s.get("default", None)
        ps.append(inspect.Parameter(name, inspect.Parameter.KEYWORD_ONLY,
                                    default=dflt))
    return inspect.Signature(ps)


def make_method(client, name, m, doc):
    """A function calling method name through client, with the method's
    signature and docstring (so help() and inspect show them)."""
    def method(params=None, /, **kw):
        return client.call(name, params, **kw)
    method.__name__ = name.split(".", 1)[1]
    method.__qualname__ = name
    method.__module__ = "rockwire"
    method.__doc__ = method_doc(m, doc)
    method.__signature__ = signature(m)
    method.schema = m
    return method


class Family:
    """The methods of one family (``rw.elastic``, ``rw.reflect``, ...)."""

    def __init__(self, client, fam, methods, doc):
        self._fam = fam
        self._verbs = sorted(methods)
        for verb, m in methods.items():
            attr = verb + "_" if verb in KEYWORDS else verb
            setattr(self, attr, make_method(client, m["name"], m, doc))
        self.__doc__ = "rockwire %s methods:\n" % fam + "\n".join(
            "  %s: %s" % (v, methods[v].get("summary", ""))
            for v in self._verbs)

    def __repr__(self):
        return "<rockwire family %s: %s>" % (self._fam, ", ".join(self._verbs))

    def __dir__(self):
        return self._verbs


def result_schemas(doc):
    """{method name: {member: component name or None}} from the
    document's result schemas."""
    out = {}
    for m in doc.get("methods", []):
        res = _deref(doc, (m.get("result") or {}).get("schema", {}))
        props = res.get("properties")
        if isinstance(props, dict):
            out[m["name"]] = {k: _ref_name(v) for k, v in props.items()}
    return out


_NUMERIC = ("outNumbers", "outGrid", "numbers")
_FLAGS = ("qc", "qcGrid")


_NUM_TYPES = frozenset((int, float, type(None)))


def _numeric_rect(v):
    """True when a nested list is rectangular (every row the same length
    at each level) and holds only numbers and nulls (no booleans,
    strings or objects). Types are gathered with set(map(type, ...)), at
    C speed: a 10^5-sample answer is checked in milliseconds."""
    if not v:
        return True
    if isinstance(v[0], list):
        n = len(v[0])
        return all(isinstance(r, list) and len(r) == n for r in v) and \
            all(_numeric_rect(r) for r in v)
    return set(map(type, v)) <= _NUM_TYPES


def _rect(v):
    """True when a nested list is rectangular (every row the same
    length at each level)."""
    if not isinstance(v, list):
        return True
    if not v:
        return True
    if isinstance(v[0], list):
        n = len(v[0])
        return all(isinstance(r, list) and len(r) == n and _rect(r)
                   for r in v)
    return list not in set(map(type, v))


def to_numpy(result, members, np):
    """A copy of result with array members as numpy arrays: QC flags
    (components qc, qcGrid, or a member named qc / qc_*) as uint64, numeric
    outputs as float64 with NaN for null. Members that are not arrays of
    numbers (strings, objects, ragged lists) are kept as they are."""
    out = {}
    members = members or {}
    for k, v in result.items():
        if isinstance(v, dict) and "mean" in v and "sd" in v:
            # an output's statistics under uncertainty: each one numeric
            out[k] = to_numpy(v, {}, np)
            continue
        if not isinstance(v, list) or not v or not _rect(v):
            out[k] = v
            continue
        ref = members.get(k)
        flags = ref in _FLAGS or k == "qc" or k.startswith("qc_")
        try:
            if flags:
                out[k] = np.array(v, dtype=np.uint64)
            elif (ref in _NUMERIC or ref is None) and _numeric_rect(v):
                # numpy reads null (None) as NaN in a float64 array
                out[k] = np.array(v, dtype=np.float64)
            else:
                out[k] = v
        except (TypeError, ValueError, OverflowError):
            out[k] = v
    return out
