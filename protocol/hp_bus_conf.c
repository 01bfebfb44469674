/* Bus settings helpers; see hp_bus_conf.h. */
#include "hp_bus_conf.h"

bool hp_baud_valid(int baud)
{
    static const int rates[] = {1200, 2400, 4800, 9600, 19200, 38400, 57600, 115200, 230400};
    for (unsigned i = 0; i < sizeof rates / sizeof rates[0]; i++)
        if (rates[i] == baud)
            return true;
    return false;
}
