# bash completion for unitgram
_unitgram()
{
    local cur prev cmd
    cur=${COMP_WORDS[COMP_CWORD]}
    prev=${COMP_WORDS[COMP_CWORD-1]}
    cmd=${COMP_WORDS[1]}
    if [ "$COMP_CWORD" -eq 2 ] && [ "$cmd" = help ]; then
        COMPREPLY=($(compgen -W "draw tally audit describe glyphs init" -- "$cur"))
        return
    fi
    if [ "$COMP_CWORD" -eq 1 ]; then
        COMPREPLY=($(compgen -W "draw tally audit describe glyphs init help --help --version" -- "$cur"))
        return
    fi
    case $prev in
        --dpi|--scale|--jobs|--watch-limit|--watch-timeout|--max-icons|--max-input-bytes|--max-panels)
            return ;;
        -o|--output|--each-row|--sheet|--check)
            COMPREPLY=($(compgen -f -- "$cur")); return ;;
        --glyph-dir)
            COMPREPLY=($(compgen -d -- "$cur")); return ;;
        --subject)
            COMPREPLY=($(compgen -W "people health-care housing food education work-money transport environment-energy community communication safety-justice other" -- "$cur")); return ;;
        --search)
            return ;;
        --format)
            case $cmd in
                draw) COMPREPLY=($(compgen -W "svg png pdf html csv" -- "$cur")) ;;
                *) COMPREPLY=($(compgen -W "text csv json" -- "$cur")) ;;
            esac
            return ;;
    esac
    case $cur in
        -*)
            case $cmd in
                draw) COMPREPLY=($(compgen -W "-o --output --format --dpi --scale --glyph-dir --each-row --jobs --quiet --watch --watch-limit --watch-timeout --strict --max-icons --max-input-bytes --max-panels --help" -- "$cur")) ;;
                tally) COMPREPLY=($(compgen -W "--format --internal --max-icons --max-input-bytes --help" -- "$cur")) ;;
                audit) COMPREPLY=($(compgen -W "--strict --format --max-icons --max-input-bytes --max-panels --help" -- "$cur")) ;;
                describe) COMPREPLY=($(compgen -W "--max-icons --max-input-bytes --max-panels --help" -- "$cur")) ;;
                glyphs) COMPREPLY=($(compgen -W "--subject --search --sheet --check --glyph-dir --help" -- "$cur")) ;;
                init) COMPREPLY=($(compgen -W "--page -o --output --replace --help" -- "$cur")) ;;
                *) COMPREPLY=($(compgen -W "--help" -- "$cur")) ;;
            esac ;;
        *)
            COMPREPLY=($(compgen -f -X '!*.y*ml' -- "$cur") $(compgen -d -- "$cur")) ;;
    esac
}
complete -F _unitgram unitgram
