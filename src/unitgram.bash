# bash completion for unitgram
_unitgram()
{
    local cur prev cmd
    cur=${COMP_WORDS[COMP_CWORD]}
    prev=${COMP_WORDS[COMP_CWORD-1]}
    cmd=${COMP_WORDS[1]}
    if [ "$COMP_CWORD" -eq 1 ]; then
        COMPREPLY=($(compgen -W "draw tally audit describe glyphs init help --help --version" -- "$cur"))
        return
    fi
    case $prev in
        -o|--output|--each-row|--sheet)
            COMPREPLY=($(compgen -f -- "$cur")); return ;;
        --glyph-dir)
            COMPREPLY=($(compgen -d -- "$cur")); return ;;
        --format)
            case $cmd in
                draw) COMPREPLY=($(compgen -W "svg png pdf html" -- "$cur")) ;;
                *) COMPREPLY=($(compgen -W "text csv json" -- "$cur")) ;;
            esac
            return ;;
    esac
    case $cur in
        -*)
            case $cmd in
                draw) COMPREPLY=($(compgen -W "-o --output --format --dpi --scale --each-row --watch --glyph-dir --max-icons --strict --help" -- "$cur")) ;;
                tally) COMPREPLY=($(compgen -W "--format --max-icons --help" -- "$cur")) ;;
                audit) COMPREPLY=($(compgen -W "--strict --format --help" -- "$cur")) ;;
                glyphs) COMPREPLY=($(compgen -W "--sheet --glyph-dir --help" -- "$cur")) ;;
                init) COMPREPLY=($(compgen -W "--page -o --help" -- "$cur")) ;;
                *) COMPREPLY=($(compgen -W "--help" -- "$cur")) ;;
            esac ;;
        *)
            COMPREPLY=($(compgen -f -X '!*.y*ml' -- "$cur") $(compgen -d -- "$cur")) ;;
    esac
}
complete -F _unitgram unitgram
