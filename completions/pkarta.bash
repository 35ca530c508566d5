# bash completion for pkarta. The options of each command are read from `pkarta COMMAND --help`,
# so they are always those of the installed binary (aliases such as --ph and --target-ph
# included); table names after --table come from the command's help, ids after --buffer,
# --medium, --into and --buffers from `pkarta library list`.
_pkarta() {
  local cur prev cmd words
  cur=${COMP_WORDS[COMP_CWORD]}
  prev=${COMP_WORDS[COMP_CWORD-1]}
  if [ "$COMP_CWORD" -eq 1 ]; then
    words=$("${COMP_WORDS[0]}" --help 2>/dev/null | sed -n 's/^  \([a-z]*\)  .*/\1/p')
    COMPREPLY=($(compgen -W "$words --help --version" -- "$cur"))
    return
  fi
  cmd=${COMP_WORDS[1]}
  case $prev in
    --compound|--library|--data|-o|--out|--output|--compounds|--out-dir)
      COMPREPLY=($(compgen -f -- "$cur"))
      return ;;
    --format)
      COMPREPLY=($(compgen -W "text csv json" -- "$cur"))
      return ;;
    --activity)
      COMPREPLY=($(compgen -W "davies sit truesdell-jones ion-pairs ideal" -- "$cur"))
      return ;;
    --table)
      words=$("${COMP_WORDS[0]}" "$cmd" --help 2>/dev/null |
              sed -n '/^Tables (/,/^$/s/^  \([a-z_]*\)  .*/\1/p')
      COMPREPLY=($(compgen -W "$words" -- "$cur"))
      return ;;
    --buffer|--buffers|--medium|--into)
      words=$("${COMP_WORDS[0]}" library list 2>/dev/null |
              awk '/^  [^ -]/ && $1 != "id" { print $1 }')
      COMPREPLY=($(compgen -W "$words" -- "$cur"))
      return ;;
  esac
  if [[ $cur == -* ]]; then
    words=$("${COMP_WORDS[0]}" "$cmd" --help 2>/dev/null | grep -o -- '--[a-z][a-z0-9-]*' | sort -u)
    COMPREPLY=($(compgen -W "$words" -- "$cur"))
  else
    COMPREPLY=($(compgen -f -- "$cur"))
  fi
}
complete -F _pkarta pkarta
