"""Generated specs for picture and report tests (an invented community-centre survey)."""

from __future__ import annotations

HEADER = '''survey centre_visits "Community centre visitor survey with a deliberately long title to test fitting"

codes yesno
  yes = 1 "Yes"
  no  = 2 "No"

codes rating
  poor = 1 "Poor"
  fair = 2 "Fair"
  good = 3 "Good"

nonresponse
  dk = 98 "Don't know"
'''


def sixty_item_spec(items: int = 60, per_section: int = 10) -> str:
    """A spec with `items` items: gates, follow-ups, a grid, a let, a stop and a skip per section."""
    lines = [HEADER, "sample branch single { north = 1 \"North\", south = 2 \"South\" }", ""]
    made = 0
    section = 0
    while made < items:
        section += 1
        gate = f"s{section}_uses_the_facility_regularly"
        cond = f" when s{section - 1}_uses_the_facility_regularly = yes" if section > 1 else ""
        lines.append(f'section part_{section} "Part {section}: facilities, programmes and other long topics"{cond}')
        lines.append(f'  {gate}: single yesno "Do you use it?" gate')
        made += 1
        lines.append(f'  stop closed_{section} "Thanks." when {gate} = no and branch = south')
        lines.append(f"  skip to s{section}_last_item_with_a_long_name when {gate} = dk")
        in_section = 1
        lines.append(f'  grid g{section} single rating "Rate each"')
        for row in range(3):
            lines.append(f'    g{section}_row_{row}_with_an_extremely_long_descriptive_name "Row {row}"')
            made += 1
            in_section += 1
        while in_section < per_section - 1 and made < items - 1:
            name = f"s{section}_follow_up_{in_section}"
            lines.append(f'  {name}: number 0..100 "How many?" when {gate} = yes')
            made += 1
            in_section += 1
        lines.append(f"  let s{section}_busy = (s{section}_follow_up_4 >= 3)")
        lines.append(f'  s{section}_last_item_with_a_long_name: text "Say more about {{s{section}_follow_up_4}}"')
        made += 1
    return "\n".join(lines) + "\n"
