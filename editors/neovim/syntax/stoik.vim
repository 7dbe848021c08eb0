" Vim syntax file for stoik reaction libraries (*.stoik).
" A light highlighter: statement keywords, labels, attribute names, arrows
" (the resonance arrows as errors), charges, phase tags, numbers, units,
" strings, comments and suppression comments.  The language server's
" semantic tokens, where the editor uses them, refine this.

if exists('b:current_syntax')
  finish
endif

syntax case match

" Statements start at column 0.
syntax match stoikKeyword /^\%(units\|use\|species\|reaction\|mixture\)\>/
syntax match stoikLabel /\%(^\%(reaction\|mixture\)\s\+\)\@<=[A-Za-z][A-Za-z0-9_-]*/
syntax match stoikAlias /\%(^species\s\+\)\@<=[A-Za-z][A-Za-z0-9_-]*\ze\s*=/

" Attribute names at the start of a continuation line or after ';'.
syntax match stoikAttribute /\%(^\s\+\|;\s*\)\@<=[A-Za-z][A-Za-z0-9_]*\ze\s*=/
syntax match stoikAttribute /\%(^units\s\+\|,\s*\)\@<=[a-z]\+\ze\s*=/

" Arrows; the resonance arrows are rejected.
syntax match stoikArrow /\s\@<=\%(<=>\|⇌\|⇄\|->\|→\|=\)\s\@=/
syntax match stoikBadArrow /<->\|↔/
" The ' + ' that joins terms (a '+' touching a formula is a charge).
syntax match stoikArrow /\s\@<=+\s\@=/

" Formula pieces.
syntax match stoikPhase /(\%(g\|l\|s\|aq\))/
syntax match stoikCharge /\^\d*[+-]/
syntax match stoikCharge /[⁰¹²³⁴⁵⁶⁷⁸⁹]*[⁺⁻]/
syntax match stoikCharge /\%([A-Za-z0-9)\]₀-₉]\)\@<=[+-]\d*>\@!/
syntax match stoikSpecial /\%(^\|[ \t0-9]\)\@<=\%(e-\|M\|hv\)\%([ \t;#]\|$\)\@=/

" Values.
syntax match stoikNumber /\%([A-Za-z0-9_.^]\)\@<![-+]\=\d\+\%(\.\d\+\)\=\%([eE][-+]\=\d\+\)\=/
syntax keyword stoikAt at
" A unit expression follows a number and a space (never the word `at`).
syntax match stoikUnit /\%(\d\s\+\)\@<=\%(at\>\|arrhenius\>\)\@!\%(°C\|[A-Za-z(]\|1\/\)[A-Za-z0-9°*·\/^()-]*/
syntax match stoikFunction /\<arrhenius\>/
syntax region stoikString start=/"/ skip=/\\"/ end=/"\|$/ oneline

" Comments, with `# stoik: allow RULE` suppressions set apart.
syntax match stoikComment /#.*$/ contains=stoikSuppression
syntax match stoikSuppression /#\s*stoik:\s*allow\%(-file\)\=\>.*$/ contained

highlight default link stoikKeyword Keyword
highlight default link stoikLabel Function
highlight default link stoikAlias Identifier
highlight default link stoikAttribute Identifier
highlight default link stoikArrow Operator
highlight default link stoikBadArrow Error
highlight default link stoikPhase StorageClass
highlight default link stoikCharge Special
highlight default link stoikSpecial Constant
highlight default link stoikNumber Number
highlight default link stoikAt Keyword
highlight default link stoikUnit Type
highlight default link stoikFunction Function
highlight default link stoikString String
highlight default link stoikComment Comment
highlight default link stoikSuppression PreProc

let b:current_syntax = 'stoik'
