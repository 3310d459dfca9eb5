#!/usr/bin/python3
"""mksingle.py - write the single-header form of psik (build/include/psik_single.h).

The output is generated from the same sources as the library, never kept by
hand: include/psik.h, lib/psik_internal.h (and any other lib/*.h a source
includes), then every lib/*.c.

    /usr/bin/python3 tools/mksingle.py [-o OUT] [ROOT]

What the generator does to the sources, and why:
  * System headers (#include <...>) of all files are hoisted to the top of
    the implementation part; local includes of lib headers are inlined once.
  * Macros a .c file defines are #undef'd at the end of that file, so two
    files may use the same macro name for different things.
  * File-scope names that are static in more than one .c file (functions,
    objects, typedefs, struct/enum tags, enum constants) are renamed to
    psik__<file>_<name> in each file that has them; uses after '.' or '->'
    (members) and inside strings and comments are left alone.
  * File-scope objects without a storage class (the kinds-table rows) get
    PSIK_HIDDEN, which is static here, so that several translation units may
    each hold a PSIK_STATIC copy.  Files that define such objects come
    before the files that declare them extern.
  * #line directives keep compiler messages pointing at lib/<file>.c.
"""
import os
import re
import sys

ROOT_DEFAULT = os.path.normpath(os.path.join(os.path.dirname(os.path.abspath(__file__)), '..'))

SYS_INC = re.compile(r'^\s*#\s*include\s*<([^>]+)>')
LOC_INC = re.compile(r'^\s*#\s*include\s*"([^"]+)"')
DEFINE = re.compile(r'^\s*#\s*define\s+([A-Za-z_]\w*)')
IDENT = re.compile(r'[A-Za-z_]\w*')
C_KEYWORDS = set('''auto break case char const continue default do double else enum extern
float for goto if inline int long register restrict return short signed sizeof static
struct switch typedef union unsigned void volatile while'''.split())


def strip_comments_strings(text):
    """Text with comments and string/char literals blanked (same length, newlines kept)."""
    out = []
    i, n = 0, len(text)
    while i < n:
        c = text[i]
        if text.startswith('/*', i):
            j = text.find('*/', i + 2)
            j = n if j < 0 else j + 2
            out.append(re.sub(r'[^\n]', ' ', text[i:j]))
            i = j
        elif text.startswith('//', i):
            j = text.find('\n', i)
            j = n if j < 0 else j
            out.append(' ' * (j - i))
            i = j
        elif c in '"\'':
            j = i + 1
            while j < n and text[j] != c:
                j += 2 if text[j] == '\\' else 1
            j = min(j + 1, n)
            out.append(c + ' ' * (j - i - 2) + c if j - i >= 2 else c)
            i = j
        else:
            out.append(c)
            i += 1
    return ''.join(out)


def file_scope(text):
    """The code outside braces (depth 0) of comment-free text, plus enum bodies."""
    depth = 0
    top = []
    for ch in text:
        if ch == '{':
            depth += 1
        elif ch == '}':
            depth -= 1
        top.append(ch if depth == 0 or ch in '{}\n' else ' ')
    return ''.join(top)


def local_names(code):
    """File-scope names private to one .c file (code: comments/strings blanked)."""
    names = set()
    top = file_scope(code)
    # Split top-level text into declarations at ';' and at '}' that closes a function body.
    for decl in re.split(r';|\}\s*\n', top):
        d = ' '.join(l for l in decl.split('\n') if not l.lstrip().startswith('#'))
        d = d.strip()
        if not d:
            continue
        words = d.split()
        if words[0] == 'static':
            head = re.split(r'[(\[=]', d.replace('{', ' ').replace('}', ' '), 1)[0]
            ids = [w for w in IDENT.findall(head) if w not in C_KEYWORDS]
            if ids:
                names.add(ids[-1])
        elif words[0] == 'typedef':
            d = d.replace('{', ' ').replace('}', ' ')
            m = re.search(r'\(\s*\*\s*([A-Za-z_]\w*)\s*\)\s*\(', d)
            if m:                       # typedef R (*name)(params)
                names.add(m.group(1))
                continue
            if '(' in d:                # typedef R name(params): not a parameter
                d = d.split('(', 1)[0]
            ids = [w for w in IDENT.findall(d) if w not in C_KEYWORDS]
            if ids:
                names.add(ids[-1])
    for m in re.finditer(r'\b(struct|union|enum)\s+([A-Za-z_]\w*)\s*\{', code):
        names.add(m.group(2))
    for m in re.finditer(r'\benum\b[^{;]*\{([^}]*)\}', code):
        for item in m.group(1).split(','):
            t = IDENT.match(item.strip())
            if t:
                names.add(t.group(0))
    return names


def plain_objects(code):
    """Names of file-scope object definitions with no storage class."""
    out = []
    for line in code.split('\n'):
        if not line or line[0] in ' \t#/{}' or line.startswith(('static', 'extern', 'typedef', 'PSIK_')):
            continue
        m = re.match(r'^(?:const\s+)?[A-Za-z_]\w*(?:\s+const)?[\s*]+(?:const\s+)?([A-Za-z_]\w*)\s*(?:\[[^\]]*\])?\s*=', line)
        if m:
            out.append(m.group(1))
    return out


def extern_names(code):
    return re.findall(r'^\s*extern\b[^;(]*?\b([A-Za-z_]\w*)\s*(?:\[[^\]]*\])?\s*;', code, re.M)


def rename(text, code, mapping):
    """Rename identifiers in text (positions from the blanked copy 'code')."""
    if not mapping:
        return text
    out = []
    last = 0
    for m in IDENT.finditer(code):
        w = m.group(0)
        if w not in mapping:
            continue
        before = code[:m.start()].rstrip()
        if before.endswith('.') or before.endswith('->'):
            continue
        out.append(text[last:m.start()])
        out.append(mapping[w])
        last = m.end()
    out.append(text[last:])
    return ''.join(out)


def main(argv):
    out_path = None
    args = list(argv)
    if '-o' in args:
        i = args.index('-o')
        out_path = args[i + 1]
        del args[i:i + 2]
    root = args[0] if args else ROOT_DEFAULT
    rel = lambda p: os.path.relpath(p, root)
    header = os.path.join(root, 'include', 'psik.h')
    libdir = os.path.join(root, 'lib')
    sources = sorted(f for f in os.listdir(libdir) if f.endswith('.c'))
    if not sources:
        sys.exit('mksingle: no lib/*.c under %s' % root)

    texts = {}
    codes = {}
    for f in sources:
        with open(os.path.join(libdir, f)) as fh:
            texts[f] = fh.read()
        codes[f] = strip_comments_strings(texts[f])

    # Names static in more than one file are renamed in each.
    owners = {}
    for f in sources:
        for nm in local_names(codes[f]):
            owners.setdefault(nm, []).append(f)
    clash = {nm: fs for nm, fs in owners.items() if len(fs) > 1}

    # Order: a file that defines a plain object another file declares extern comes first.
    defines = {f: set(plain_objects(codes[f])) for f in sources}
    needs = {f: set(extern_names(codes[f])) for f in sources}
    order = []
    pending = list(sources)
    while pending:
        for f in pending:
            deps = [g for g in pending if g != f and needs[f] & defines[g]]
            if not deps:
                order.append(f)
                pending.remove(f)
                break
        else:
            sys.exit('mksingle: circular extern definitions among ' + ' '.join(pending))

    sys_includes = []
    inlined = set(['psik.h'])
    body = []

    def add_sys(name):
        if name not in sys_includes:
            sys_includes.append(name)

    def emit_header(path, name):
        """Inline a lib header once (with its own local includes)."""
        if name in inlined:
            return
        inlined.add(name)
        with open(path) as fh:
            lines = fh.read().split('\n')
        body.append('#line 1 "%s"' % rel(path))
        for ln, line in enumerate(lines, 1):
            m = SYS_INC.match(line)
            l2 = LOC_INC.match(line)
            if m:
                add_sys(m.group(1))
                body.append('')
            elif l2:
                sub = os.path.join(os.path.dirname(path), l2.group(1))
                if l2.group(1) == 'psik.h':
                    body.append('')
                elif os.path.exists(sub):
                    emit_header(sub, l2.group(1))
                    body.append('#line %d "%s"' % (ln + 1, rel(path)))
                else:
                    sys.exit('mksingle: %s:%d: cannot find "%s"' % (rel(path), ln, l2.group(1)))
            else:
                body.append(line)

    emit_header(os.path.join(libdir, 'psik_internal.h'), 'psik_internal.h')
    renamed_total = 0
    for f in order:
        base = f[:-2]
        mapping = {nm: 'psik__%s_%s' % (re.sub(r'\W', '_', base), nm)
                   for nm, fs in clash.items() if f in fs}
        renamed_total += len(mapping)
        text = rename(texts[f], codes[f], mapping)
        objs = set(defines[f])
        macros = []
        path = os.path.join(libdir, f)
        body.append('')
        body.append('/* ' + '-' * 20 + ' lib/%s ' % f + '-' * 20 + ' */')
        body.append('#line 1 "lib/%s"' % f)
        for ln, line in enumerate(text.split('\n'), 1):
            m = SYS_INC.match(line)
            l2 = LOC_INC.match(line)
            d = DEFINE.match(line)
            if m:
                add_sys(m.group(1))
                body.append('')
                continue
            if l2:
                sub = os.path.join(libdir, l2.group(1))
                if l2.group(1) in inlined:
                    body.append('')
                elif os.path.exists(sub):
                    emit_header(sub, l2.group(1))
                    body.append('#line %d "lib/%s"' % (ln + 1, f))
                else:
                    sys.exit('mksingle: lib/%s:%d: cannot find "%s"' % (f, ln, l2.group(1)))
                continue
            if d and d.group(1) not in macros:
                macros.append(d.group(1))
            om = re.match(r'^(?:const\s+)?[A-Za-z_]\w*(?:\s+const)?[\s*]+(?:const\s+)?([A-Za-z_]\w*)\s*(?:\[[^\]]*\])?\s*=', line)
            if (om and om.group(1) in objs and line[0] not in ' \t'
                    and not line.startswith(('static', 'extern', 'typedef', 'PSIK_'))):
                line = 'PSIK_HIDDEN ' + line
            body.append(line)
        if macros:
            body.append('/* macros of lib/%s end here */' % f)
            for mac in macros:
                body.append('#undef ' + mac)

    with open(header) as fh:
        htext = fh.read()

    out = []
    out.append('''/* psik_single.h - psik as one header. GENERATED by tools/mksingle.py from
 * include/psik.h, lib/psik_internal.h and lib/{%s}; do not edit (run `make single`).
 *
 * Use: in exactly one C (or C++20) file of your program write
 *
 *     #define PSIK_IMPLEMENTATION
 *     #include "psik_single.h"
 *
 * and include it without the define everywhere else. Define PSIK_STATIC as
 * well to make every psik function static to that file (then each file that
 * uses psik includes it with PSIK_STATIC, and PSIK_IMPLEMENTATION is implied).
 * Link with -lm. The API and its documentation are those of psik.h below.
 */''' % ','.join(s[:-2] for s in sources))
    out.append('#ifndef PSIK_SINGLE_H')
    out.append('#define PSIK_SINGLE_H')
    out.append('#define PSIK_SINGLE 1')
    out.append('#if defined(PSIK_STATIC) && !defined(PSIK_IMPLEMENTATION)')
    out.append('#  define PSIK_IMPLEMENTATION')
    out.append('#endif')
    out.append('#if defined(PSIK_STATIC) && !defined(PSIK_API)')
    out.append('#  if defined(__GNUC__)')
    out.append('#    define PSIK_API static __attribute__((unused))')
    out.append('#  else')
    out.append('#    define PSIK_API static')
    out.append('#  endif')
    out.append('#endif')
    out.append('#line 1 "include/psik.h"')
    out.append(htext.rstrip('\n'))
    out.append('#endif /* PSIK_SINGLE_H */')
    out.append('')
    out.append('#if defined(PSIK_IMPLEMENTATION) && !defined(PSIK_SINGLE_IMPLEMENTED)')
    out.append('#define PSIK_SINGLE_IMPLEMENTED')
    out.append('/* Internal helpers and table rows are static in the single header. */')
    out.append('#ifndef PSIK_HIDDEN')
    out.append('#  if defined(__GNUC__)')
    out.append('#    define PSIK_HIDDEN static __attribute__((unused))')
    out.append('#  else')
    out.append('#    define PSIK_HIDDEN static')
    out.append('#  endif')
    out.append('#endif')
    out.append('/* Compiled as C++ (C++20 for the designated initializers of the kinds')
    out.append(' * table): rows leave optional members out on purpose, and C99 restrict')
    out.append(' * is spelt __restrict. */')
    out.append('#if defined(__cplusplus) && defined(__GNUC__)')
    out.append('#  pragma GCC diagnostic push')
    out.append('#  pragma GCC diagnostic ignored "-Wmissing-field-initializers"')
    out.append('#endif')
    out.append('#if defined(__cplusplus) && !defined(restrict)')
    out.append('#  define restrict __restrict')
    out.append('#  define PSIK__SINGLE_RESTRICT')
    out.append('#endif')
    for s in sys_includes:
        out.append('#include <%s>' % s)
    out.extend(body)
    out.append('#if defined(__cplusplus) && defined(__GNUC__)')
    out.append('#  pragma GCC diagnostic pop')
    out.append('#endif')
    out.append('#ifdef PSIK__SINGLE_RESTRICT')
    out.append('#  undef restrict')
    out.append('#  undef PSIK__SINGLE_RESTRICT')
    out.append('#endif')
    out.append('#endif /* PSIK_IMPLEMENTATION */')
    result = '\n'.join(out) + '\n'

    if out_path:
        os.makedirs(os.path.dirname(os.path.abspath(out_path)), exist_ok=True)
        tmp = out_path + '.tmp'
        with open(tmp, 'w') as fh:
            fh.write(result)
        os.replace(tmp, out_path)
        sys.stderr.write('mksingle: wrote %s (%d sources, %d names renamed, %d lines)\n'
                         % (out_path, len(sources), renamed_total, result.count('\n')))
    else:
        sys.stdout.write(result)


if __name__ == '__main__':
    main(sys.argv[1:])
