#!/usr/bin/python3
"""Every example command in the README and the man pages, as a list to run.

Reads README.md (indented or fenced code blocks; a block fenced as ```text is
output and is not read) and the man pages (.nf/.fi
blocks), joins continued lines, and prints one JSON object per example:
{"file", "line", "command", "exit", "shows", "skip"}.

An example is a line whose first word is one of our programs (halostage,
halostaged, halostage-sim, with or without build/). Lines of other programs
(make, apt, systemctl, cp, an editor) are instructions for a machine, not
examples of ours, and are listed with "skip" saying so. A trailing comment
may carry markers, written for a reader as much as for this test:
  (not run: REASON)   the example needs what a test machine has not
  (exit N)            the example ends with status N; (exit 0|1) where the
                      answer depends on the brine of the day (plan: 1 = a
                      limit would be broken)
  shows: TEXT         the output contains TEXT, blanks folded (a figure the
                      text states); several are separated by semicolons
"""
import json
import re
import sys

OURS = re.compile(r'^(?:build/)?(halostage|halostaged|halostage-sim)(\s|$)')
MARK_EXIT = re.compile(r'\(exit ([\d|]+)\)')
MARK_SKIP = re.compile(r'\(not run: ([^)]*)\)')
MARK_SHOWS = re.compile(r'shows: ([^;]+)')
INI = re.compile(r'^(\[[a-z_]+( [^\]]+)?\]|[a-z_]+ *=.*|;.*)$')


def split_comment(line):
    """Command text and trailing comment ('#' outside quotes, after a blank)."""
    quote = None
    for i, ch in enumerate(line):
        if quote:
            if ch == quote:
                quote = None
        elif ch in '"\'':
            quote = ch
        elif ch == '#' and (i == 0 or line[i - 1] in ' \t'):
            return line[:i].rstrip(), line[i + 1:].strip()
    return line.rstrip(), ''


def examples_from_lines(path, numbered):
    """numbered: (line number, text) of code lines, in order, blocks split by None."""
    out = []
    pending = None
    for item in numbered + [None]:
        if item is None:
            if pending:
                out.append(pending)
            pending = None
            continue
        no, text = item
        cmd, comment = split_comment(text)
        if pending is not None:
            # a continued line: its comment joins the example's comment
            pending['command'] += ' ' + cmd.strip().rstrip('\\').strip()
            pending['comment'] += ' ' + comment
            if not cmd.endswith('\\'):
                out.append(pending)
                pending = None
            continue
        stripped = cmd.strip()
        if INI.match(stripped):
            continue  # a site-file excerpt, not a command
        if not stripped:
            # a comment-only line continues the previous example's comment
            if out and comment and out[-1]['line'] == no - 1:
                out[-1]['comment'] += ' ' + comment
            continue
        ex = {'file': path, 'line': no, 'command': stripped.rstrip('\\').strip(),
              'comment': comment, 'ours': bool(OURS.match(stripped))}
        if stripped.endswith('\\'):
            pending = ex
        else:
            out.append(ex)
    return out


def readme_code(path):
    lines = open(path, encoding='utf-8').read().split('\n')
    numbered, fenced, prev_blank = [], False, True
    for no, text in enumerate(lines, 1):
        if text.startswith('```'):
            # ```text marks shown output, not commands
            fenced = 'output' if text.strip() == '```text' else (not fenced and 'code')
            numbered.append(None)
            continue
        if fenced == 'output':
            continue
        if fenced:
            numbered.append((no, text))
        elif text.startswith('    ') and (prev_blank or (numbered and numbered[-1] is not None)):
            numbered.append((no, text[4:]))
        else:
            if numbered and numbered[-1] is not None:
                numbered.append(None)
        prev_blank = text.strip() == '' and (not numbered or numbered[-1] is None)
    return numbered


def man_code(path):
    numbered, inside = [], False
    for no, text in enumerate(open(path, encoding='utf-8').read().split('\n'), 1):
        if text.startswith('.nf'):
            inside = True
            continue
        if text.startswith('.fi'):
            inside = False
            numbered.append(None)
            continue
        if inside and not text.startswith('.'):
            text = text.replace('\\-', '-').replace('\\e', '\\').replace('\\(aq', "'")
            text = text.replace('\\&', '')
            numbered.append((no, text))
    return numbered


def main(paths):
    for path in paths:
        code = man_code(path) if re.search(r'\.[158]$', path) else readme_code(path)
        for ex in examples_from_lines(path, code):
            c = ex.pop('comment')
            skip = None
            m = MARK_SKIP.search(c)
            if m:
                skip = m.group(1)
            elif not ex['ours']:
                skip = 'an instruction for a machine, not one of our programs'
            m = MARK_EXIT.search(c)
            shows = MARK_SHOWS.findall(c)
            ex.update({'exit': [int(x) for x in m.group(1).split('|')] if m else [0],
                       'shows': [s.strip() for s in shows], 'skip': skip})
            del ex['ours']
            print(json.dumps(ex))


if __name__ == '__main__':
    main(sys.argv[1:])
