/**
 * File globs of the project config, matched against paths relative to the config's folder with `/`
 * separators. The syntax is the common one (common practice, no source):
 *
 *   `*`       any characters within one path segment (not `/`)
 *   `?`       one character within a segment
 *   `**`      as a whole segment: zero or more segments (`data/**` matches every file below data/)
 *   `[abc]`   one of the characters; `[a-z]` a range; `[!abc]` none of them
 *   `{a,b}`   either alternative, within one segment (may hold the other wildcards; not nested)
 *   `\x`      the character x itself
 *
 * Matching is case-sensitive, and a leading `./` in a pattern or path is ignored. A pattern that
 * starts with `/` or a drive letter, or climbs with `..`, is refused by `globProblem` (the config
 * describes files inside the project).
 */

function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
}

/** Why a pattern cannot be used, or null when it is fine. */
export function globProblem(pattern: string): string | null {
  if (pattern.trim() === '') return 'is empty';
  if (pattern.startsWith('/') || /^[A-Za-z]:[\\/]/.test(pattern)) return 'must be relative to the folder of the config file';
  if (pattern.includes('\\\\') || /\\(?![*?[\]{},\\!])/.test(pattern)) return 'uses a backslash: write paths with /';
  if (normalize(pattern).split('/').includes('..')) return "must not climb out of the project with '..'";
  let depth = 0;
  let inClass = false;
  for (let i = 0; i < pattern.length; i++) {
    const c = pattern[i];
    if (c === '\\') {
      i++;
      continue;
    }
    if (inClass) {
      if (c === ']') inClass = false;
      continue;
    }
    if (c === '[') inClass = true;
    else if (c === '{') {
      if (depth > 0) return 'nests {…} inside {…}, which is not supported';
      depth++;
    } else if (c === '}') {
      if (depth === 0) return "has a '}' without its '{'";
      depth--;
    } else if (c === '/' && depth > 0) {
      return "has a '/' inside {…}: alternatives must stay within one folder level";
    }
  }
  if (inClass) return "has a '[' without its ']'";
  if (depth > 0) return "has a '{' without its '}'";
  return null;
}

function normalize(path: string): string {
  return path.replace(/^(\.\/)+/, '');
}

/** The regular expression of one segment's worth of pattern text (no `/` inside). */
function segmentSource(text: string): string {
  let out = '';
  for (let i = 0; i < text.length; i++) {
    const c = text[i]!;
    if (c === '\\' && i + 1 < text.length) {
      out += escapeRegExp(text[++i]!);
    } else if (c === '*') {
      while (text[i + 1] === '*') i++;
      out += '[^/]*';
    } else if (c === '?') {
      out += '[^/]';
    } else if (c === '[') {
      const end = text.indexOf(']', i + 2);
      if (end < 0) {
        out += '\\[';
        continue;
      }
      let body = text.slice(i + 1, end);
      const negated = body.startsWith('!');
      if (negated) body = body.slice(1);
      out += `[${negated ? '^/' : ''}${body.replace(/[\\\]^]/g, '\\$&')}]`;
      i = end;
    } else if (c === '{') {
      const end = text.indexOf('}', i);
      const alternatives = text.slice(i + 1, end).split(',');
      out += `(?:${alternatives.map(segmentSource).join('|')})`;
      i = end;
    } else {
      out += escapeRegExp(c);
    }
  }
  return out;
}

/** Compiles a glob into a whole-path regular expression. */
export function globToRegExp(pattern: string): RegExp {
  const segments = normalize(pattern).split('/');
  let source = '';
  segments.forEach((segment, i) => {
    const last = i === segments.length - 1;
    if (segment === '**') {
      // Zero or more whole segments; as the last segment, one or more (a file below the folder).
      source += last ? '(?:[^/]+/)*[^/]+' : '(?:[^/]+/)*';
    } else {
      source += segmentSource(segment) + (last ? '' : '/');
    }
  });
  return new RegExp(`^${source}$`);
}

/** Whether `path` (relative, `/`-separated) matches `pattern`. */
export function globMatches(pattern: string, path: string): boolean {
  return globToRegExp(pattern).test(normalize(path));
}
