"""Word lists for the invented demo scenario: the reference outline, modifier profiles, names.

Everything here is invented for the demo. The marketplace, supplier and brand-line names are made-up compounds;
any likeness to a real business is accidental.

Outline syntax, one concept per line, two spaces of indent per level:

    Label | synonym; ~hidden synonym; us:US term :: noun, noun/alternative noun {profile} [deprecated]

- plain synonyms are published as skos:altLabel; `~hidden` ones and `us:` ones are never published, only suppliers
  use them (so a mapper cannot win on alt labels alone);
- nouns (leaves only) seed item titles; `a/b` gives a second wording `b` (often the US one);
- `{profile}` picks the modifier profile for the concept and everything below it.

>>> nodes = parse_outline("Garden {plant}\\n  Roses | rose bushes :: climbing rose")
>>> [(n.label, n.parent, n.profile, n.nouns) for n in nodes]
[('Garden', None, 'plant', []), ('Roses', 0, 'plant', [('climbing rose', 'climbing rose')])]
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field

MARKETPLACE = "Tumblethorn Market"
REFERENCE_TITLE = "Tumblethorn Market product hierarchy"
REFERENCE_VERSION = "2024.2"
REFERENCE_BASE = (
    "https://example.org/tumblethorn/reference/"  # example.org is reserved for examples (RFC 2606)
)
NOTATION_ROOT = "HG"

# key, display name, taxonomy format; the three suppliers are invented.
SUPPLIERS = [
    ("fennelgrist", "Fennelgrist Supply Co.", "tree"),
    ("wrenmantle", "Wrenmantle Goods", "tags"),
    ("cobbleweir", "Cobbleweir Homestore", "paths"),
]

BRAND_LINES = [
    "Ashlowe",
    "Brackwell",
    "Corvane",
    "Dunmarle",
    "Elderquist",
    "Fallowby",
    "Gorsedale",
    "Hazelrun",
    "Ivelmoor",
    "Juniperwick",
    "Kestrelby",
    "Lumbrae",
    "Merrowen",
    "Nettlebank",
    "Orrisholt",
    "Pellwyn",
    "Quarrymead",
    "Rushwold",
    "Sallowfen",
    "Tamsett",
    "Umberlea",
    "Vellacott",
    "Wychmoor",
    "Yarrowdene",
    "Zennorby",
    "Thimblecrag",
    "Moorquill",
    "Saltmarrow",
]

REFERENCE_OUTLINE = """
Garden | gardening; ~garden supplies {plant}
  Plants | live plants; ~plants and bulbs
    Flowering plants | flowers; ~bedding and perennials
      Perennials | herbaceous perennials :: perennial plant, lavender plant, hardy geranium, salvia plant
      Bedding plants | annuals; ~summer bedding :: bedding plant tray, petunia plug plants, begonia plants, pansy plugs
      Roses | rose bushes :: climbing rose, shrub rose, patio rose, rambling rose
      Flower bulbs | bulbs; ~spring bulbs :: tulip bulbs, daffodil bulbs, allium bulbs, crocus bulbs, lily bulbs
    Shrubs & trees | woody plants; ~trees and shrubs
      Shrubs | bushes :: hydrangea shrub, camellia shrub, buddleia shrub, box ball
      Fruit trees | orchard trees :: apple tree, pear tree, plum tree, cherry tree
      Hedging plants | hedging; ~hedge plants :: privet hedging, beech hedging, laurel hedging, yew hedging
      Climbers | climbing plants :: clematis, honeysuckle, jasmine climber, wisteria
    Seeds | ~seed packets {seed}
      Flower seeds | :: sweet pea seeds, sunflower seeds, wildflower seed mix, cosmos seeds
      Vegetable seeds | veg seeds; us:vegetable seed packets :: tomato seeds, carrot seeds, lettuce seeds, runner bean seeds/pole bean seeds
      Herb seeds | :: basil seeds, parsley seeds, coriander seeds/cilantro seeds, chive seeds
      Grass seed | lawn seed; us:grass seed mix :: hard-wearing lawn seed, shade lawn seed, quick-grow grass seed
    Indoor plants | houseplants; ~house plants
      Foliage houseplants | leafy houseplants :: monstera plant, fiddle leaf fig, rubber plant, peace lily
      Cacti & succulents | succulents; ~cactus :: cactus, aloe vera plant, echeveria, jade plant
      Orchids | :: phalaenopsis orchid, moth orchid, cymbidium orchid
  Garden tools | gardening tools; ~tools for the garden {tool}
    Cutting tools | pruning tools; ~cutting and pruning
      Secateurs | pruning shears; us:pruners :: bypass secateurs/bypass pruners, anvil secateurs/anvil pruners, ratchet secateurs/ratchet pruners
      Loppers | long-handled pruners :: bypass loppers, anvil loppers, telescopic loppers
      Shears | hedge shears; ~garden shears :: hedge shears, topiary shears, grass shears
      Pruning saws | garden saws :: folding pruning saw, bow saw, pole saw
    Digging tools | ~spades and forks
      Spades | :: digging spade, border spade, drainage spade
      Garden forks | forks; us:spading forks :: digging fork, border fork, manure fork
      Trowels & hand forks | hand tools; ~hand trowels :: hand trowel, transplanting trowel, hand fork
      Hoes & rakes | :: dutch hoe, draw hoe, soil rake, lawn rake/leaf rake
    Power garden tools | powered garden tools; ~garden machinery {power}
      Lawn mowers | mowers; us:lawnmowers
        Cordless lawn mowers | battery mowers :: cordless rotary mower, cordless cylinder mower
        Petrol lawn mowers | petrol mowers; us:gas lawn mowers :: self-propelled petrol mower/self-propelled gas mower, push petrol mower/push gas mower
        Electric lawn mowers | corded mowers :: corded rotary mower, hover mower
        Robotic lawn mowers | robot mowers :: robotic mower, robot mower garage
      Grass trimmers | strimmers; us:string trimmers; ~line trimmers :: cordless grass trimmer/cordless string trimmer, electric strimmer/electric weed eater
      Hedge trimmers | ~hedge cutters :: cordless hedge trimmer, electric hedge trimmer, long reach hedge trimmer
      Leaf blowers | blowers; ~garden vacuums :: cordless leaf blower, garden vacuum, backpack leaf blower
      Chainsaws | :: cordless chainsaw, electric chainsaw, top-handle chainsaw
    Wheelbarrows & carts | garden carts; us:yard carts :: wheelbarrow, garden trolley/garden wagon, tipping cart
    Tool storage | ~tool racks :: garden tool rack, tool tidy/tool organizer, wall tool hanger
  Lawn care | lawn; us:yard care {garden_supply}
    Lawn feed | lawn fertiliser; us:lawn fertilizer :: spring lawn feed, autumn lawn feed, weed and feed
    Lawn edging | edging; ~lawn borders :: steel lawn edging, plastic lawn edging, rubber lawn edging
    Scarifiers & aerators | lawn rakes; us:dethatchers :: electric scarifier/electric dethatcher, lawn aerator, hollow tine aerator
    Lawn repair | ~lawn patch :: lawn patch repair, rolled turf/sod roll, lawn top dressing
  Watering | watering & irrigation; ~irrigation {tool}
    Hoses | ~hosepipes
      Garden hoses | hosepipes; us:garden hose :: garden hose, expandable hose, flat hose
      Hose reels | hose carts :: hose reel, wall-mounted hose reel, hose reel cart
      Hose fittings | hose connectors :: hose connector set, tap connector/spigot connector, hose spray gun
    Watering cans | ~cans :: plastic watering can, galvanised watering can, indoor watering can
    Sprinklers | lawn sprinklers :: oscillating sprinkler, rotating sprinkler, pulsating sprinkler
    Irrigation kits | drip irrigation; ~micro irrigation :: drip irrigation kit, soaker hose, watering timer
    Water butts | ~rainwater storage; us:rain barrels :: water butt/rain barrel, rain diverter kit, water butt stand
  Pots & planters | containers; ~planters and pots {outdoor}
    Plant pots | pots; ~flower pots :: terracotta pot, glazed plant pot, plastic plant pot, self-watering pot
    Planters | troughs; ~window boxes :: wooden planter, window box, trough planter, raised planter
    Hanging baskets | :: hanging basket, basket liner, hanging basket bracket
  Soil & compost | growing media; ~compost and feed {garden_supply}
    Compost | ~potting compost; us:potting soil :: multi-purpose compost/potting mix, peat-free compost, seed compost, ericaceous compost
    Plant feed | plant food; us:plant fertilizer :: tomato feed, liquid plant feed, slow release plant food
    Mulch & bark | bark chippings :: bark mulch, decorative bark, slate chippings
    Composters | compost bins :: compost bin, wormery/worm farm, compost tumbler
  Pest & weed control | garden protection {garden_supply}
    Weedkillers | weed killers; us:herbicides :: path weedkiller, lawn weedkiller, ready-to-use weedkiller
    Slug & pest control | pest control :: slug pellets, slug traps, insect netting
    Animal repellers | deterrents :: ultrasonic cat repeller, bird scarer, mole repeller
  Garden buildings | outbuildings; ~sheds and greenhouses {outdoor}
    Sheds | garden sheds :: wooden shed, metal shed, plastic shed, pent shed
    Greenhouses | glasshouses :: polycarbonate greenhouse, lean-to greenhouse, mini greenhouse, cold frame
    Garden storage boxes | storage boxes; us:deck boxes :: garden storage box/deck box, storage bench, bike store
  Wildlife care | birds and wildlife; ~bird care {pet}
    Bird feeders | :: hanging bird feeder, seed feeder, suet feeder, bird table
    Bird food | wild bird food; us:bird seed :: wild bird seed mix, suet balls, sunflower hearts, mealworms
    Bird houses | nest boxes; us:birdhouses :: nest box/birdhouse, bat box, insect hotel
Outdoor living | garden living; ~patio and outdoor {outdoor}
  Garden furniture | outdoor furniture; us:patio furniture
    Garden furniture sets | patio sets; ~garden dining sets :: garden dining set, bistro set, rattan corner sofa set, garden lounge set
    Garden chairs | outdoor chairs; us:patio chairs :: folding garden chair, reclining garden chair, stacking chair, deck chair
    Garden tables | outdoor tables; us:patio tables :: garden dining table, garden side table, folding garden table
    Garden benches | benches :: wooden garden bench, metal garden bench, storage bench seat
    Sun loungers | loungers; us:chaise lounges :: sun lounger/chaise lounge, reclining lounger, day bed
    Swing seats | hammocks; ~hammocks and swings :: hammock, hammock with stand, swing seat/porch swing, hanging egg chair
    Furniture covers | ~protective covers :: garden furniture cover, chair cover, parasol cover
  Barbecues & outdoor cooking | bbq; us:grilling; ~outdoor cooking
    Barbecues | bbqs; us:grills
      Charcoal barbecues | charcoal bbqs; us:charcoal grills :: kettle barbecue/kettle grill, barrel barbecue/barrel grill, portable charcoal barbecue/portable charcoal grill
      Gas barbecues | gas bbqs; us:gas grills :: 2-burner gas barbecue/2-burner gas grill, 4-burner gas barbecue/4-burner gas grill, portable gas barbecue/portable gas grill
      Electric barbecues | us:electric grills :: electric barbecue/electric grill, tabletop electric grill
    Pizza ovens | outdoor ovens :: wood-fired pizza oven, gas pizza oven, pizza stone
    Accessories | barbecue accessories; us:grill accessories; ~bbq tools :: barbecue tool set/grill tool set, grill brush, barbecue cover/grill cover, meat thermometer
    Barbecue fuel | fuel; ~charcoal :: lumpwood charcoal, charcoal briquettes, firelighters/fire starters, gas cylinder regulator
  Outdoor heating | patio heating
    Patio heaters | ~garden heaters :: electric patio heater, gas patio heater, wall-mounted patio heater
    Fire pits | firepits; ~fire bowls :: steel fire pit, fire pit table, fire bowl
    Chimineas | chimeneas :: clay chiminea, steel chiminea, cast iron chiminea
  Shade & shelter | shade
    Parasols | garden umbrellas; us:patio umbrellas :: cantilever parasol/cantilever umbrella, tilting parasol/tilting umbrella, parasol base/umbrella base
    Gazebos | pop-up gazebos; ~canopies :: pop-up gazebo/pop-up canopy, metal gazebo, gazebo side panels
    Awnings | sun shades :: retractable awning, shade sail, patio awning
  Garden decor | outdoor decor; us:yard decor
    Garden ornaments | statues :: garden statue, garden gnome, sundial, gazing ball
    Water features | fountains :: solar fountain, wall water feature, cascade water feature
    Outdoor rugs | patio rugs :: outdoor rug, reversible patio rug, outdoor doormat
  Outdoor play | garden games; ~kids outdoor {pet}
    Swings & slides | play sets; us:swing sets :: garden swing set, freestanding slide, climbing frame/jungle gym
    Trampolines | :: round trampoline, trampoline with enclosure, trampoline ladder
    Paddling pools | ~pools; us:kiddie pools :: inflatable paddling pool/inflatable kiddie pool, rigid paddling pool, pool cover
    Lawn games | outdoor games :: giant tumbling tower, boules set, croquet set, tether tennis set
Lighting | lights; ~illumination {light}
  Ceiling lights | ~overhead lighting
    Pendant lights | pendants; ~hanging lights :: glass pendant light, rattan pendant shade, cluster pendant, industrial pendant
    Flush ceiling lights | flush lights; us:flush mount lights :: flush ceiling light/flush mount light, semi-flush ceiling light, LED panel light
    Chandeliers | :: crystal chandelier, candle chandelier, beaded chandelier
    Spotlights | spot lights; ~track lights :: ceiling spotlight bar, track lighting kit, recessed downlight/recessed light
  Lamps | ~floor and table lamps
    Table lamps | bedside lamps :: ceramic table lamp, touch table lamp, bedside lamp/nightstand lamp, mushroom lamp
    Floor lamps | standard lamps :: arc floor lamp, tripod floor lamp, uplighter floor lamp/torchiere lamp
    Desk lamps | task lamps; ~reading lamps :: LED desk lamp, balanced-arm desk lamp, clip-on reading lamp
  Wall lights | wall lamps; us:wall sconces :: wall light/wall sconce, picture light, swing-arm wall light, bathroom wall light
  Light bulbs | bulbs; ~lamps and tubes
    LED bulbs | :: LED GLS bulb/LED A19 bulb, LED candle bulb, LED spotlight bulb, smart LED bulb
    Filament bulbs | vintage bulbs :: filament globe bulb, squirrel cage bulb, tube filament bulb
    Halogen bulbs [deprecated] :: halogen capsule bulb, halogen spotlight bulb
  Lampshades | shades :: drum lampshade, pleated lampshade, empire lampshade
  Outdoor lighting | garden lighting; ~exterior lights
    Solar lights | solar garden lights :: solar stake lights, solar string lights, solar spotlight, solar lanterns
    Outdoor wall lights | exterior wall lights; ~porch lights :: outdoor wall lantern, up and down wall light, porch light
    Security lights | floodlights; ~PIR lights :: PIR floodlight/motion floodlight, LED security light, motion sensor light
    String lights | festoon lights; us:string lights; ~fairy lights :: festoon lights, fairy lights/twinkle lights, outdoor string lights
    Path lights | deck lights; ~bollard lights :: bollard light, deck lights, post light
  Smart lighting | connected lighting :: smart light strip, smart lighting starter kit, smart plug-in dimmer
  Accessories | lighting accessories; ~light fittings :: ceiling rose/ceiling canopy, dimmer switch, lamp cord set, bulb holder/lamp socket
Furniture | home furniture {furn}
  Living room furniture | lounge furniture; us:living room
    Sofas | settees; us:couches
      Fabric sofas | :: 2-seater fabric sofa/loveseat, 3-seater fabric sofa, fabric corner sofa/sectional sofa
      Leather sofas | :: 2-seater leather sofa, 3-seater leather sofa, leather recliner sofa
      Sofa beds | ~sofabeds; us:sleeper sofas :: click-clack sofa bed, pull-out sofa bed, chair bed
    Armchairs | accent chairs :: wingback armchair, tub chair, recliner armchair, accent chair
    Coffee tables | us:cocktail tables :: wooden coffee table, glass coffee table, nest of tables
    TV stands | TV units; us:media consoles :: TV unit/media console, corner TV stand, media cabinet
    Footstools | pouffes; us:ottomans :: footstool/ottoman, pouffe/pouf, storage footstool
  Bedroom furniture | bedroom {bed}
    Beds | bed frames
      Double beds | :: double bed frame/full bed frame, ottoman double bed, upholstered double bed
      Single beds | :: single bed frame/twin bed frame, cabin bed, bunk bed
      Divan beds | divans; us:box spring beds :: divan base/box spring, divan bed set
    Mattresses | :: memory foam mattress, pocket sprung mattress/pocket spring mattress, hybrid mattress, mattress topper
    Wardrobes | us:armoires; ~closets :: 2-door wardrobe, sliding door wardrobe, open wardrobe rail/clothes rack
    Chests of drawers | drawers; us:dressers :: 3-drawer chest, 5-drawer tallboy/tall dresser, bedside table/nightstand
    Dressing tables | vanity tables :: dressing table/vanity table, dressing table stool, dressing table mirror
  Dining furniture | dining room
    Dining tables | :: extending dining table/extendable dining table, round dining table, drop-leaf table
    Dining chairs | :: upholstered dining chair, wooden dining chair, bar stool
    Dining sets | :: 4-seater dining set, 6-seater dining set, bistro table set
    Sideboards | buffets; ~display cabinets :: sideboard/buffet cabinet, display cabinet, drinks cabinet
  Storage furniture | storage
    Bookcases & shelving | bookshelves :: bookcase/bookshelf, ladder shelf, cube shelving unit, floating shelves
    Shoe storage | shoe racks :: shoe rack, shoe cabinet, shoe bench
    Hallway furniture | coat stands; us:entryway furniture :: coat stand/coat rack, hallway bench/entryway bench, wall coat hooks
    Storage baskets | baskets; ~storage boxes :: storage basket, fabric storage box/fabric storage bin, underbed storage box
  Home office furniture | office furniture
    Desks | :: computer desk, corner desk, standing desk, ladder desk
    Office chairs | desk chairs :: ergonomic office chair, mesh office chair, gaming chair
    Office storage | filing cabinets :: filing cabinet, desk pedestal, office storage unit
Kitchen & dining | kitchen; ~kitchenware {kitchen}
  Cookware | pots and pans; ~pans
    Frying pans | skillets; us:skillets :: non-stick frying pan/non-stick skillet, cast iron skillet, griddle pan, wok
    Saucepans | ~pots; us:saucepots :: saucepan set/cookware set, milk pan, stockpot
    Casserole dishes | us:dutch ovens :: cast iron casserole dish/dutch oven, shallow casserole, stoneware casserole
    Roasting tins | roasting trays; us:roasting pans :: roasting tin/roasting pan, roasting rack, oven tray/sheet pan
  Bakeware | baking
    Baking tins | baking trays; us:baking pans :: baking tray/baking sheet, loaf tin/loaf pan, springform cake tin/springform pan, muffin tray/muffin pan
    Baking tools | baking accessories :: rolling pin, pastry brush, cooling rack, piping bag set
    Mixing bowls | :: glass mixing bowl, mixing bowl set, melamine mixing bowl
  Kitchen utensils | utensils; ~kitchen gadgets
    Knives | kitchen knives
      Chef's knives | cook's knives :: chef's knife, santoku knife, bread knife, paring knife
      Knife sets | knife blocks :: knife block set, magnetic knife rack, knife sharpener
    Chopping boards | us:cutting boards :: wooden chopping board/wooden cutting board, chopping board set/cutting board set, marble board
    Cooking utensils | ~spatulas and spoons :: silicone spatula, wooden spoon set, ladle, tongs
    Measuring tools | ~kitchen scales :: kitchen scales, measuring jug/measuring cup, measuring spoons
    Graters & peelers | :: box grater, speed peeler, mandoline slicer, zester
  Tableware | dinnerware; us:dinnerware
    Dinner sets | dinnerware sets :: 12-piece dinner set/12-piece dinnerware set, stoneware dinner set, porcelain dinner set
    Plates & bowls | :: dinner plates, side plates/salad plates, pasta bowls, cereal bowls
    Glassware | glasses; us:drinkware :: wine glasses, tumblers, highball glasses, champagne flutes
    Cutlery | us:flatware :: cutlery set/flatware set, steak knives, teaspoons
    Mugs & cups | mugs :: stoneware mugs, espresso cups, travel mug
    Table linen | ~table cloths :: tablecloth, placemats, serving platter, napkins
  Small kitchen appliances | small appliances; ~countertop appliances {appliance}
    Kettles | electric kettles :: cordless kettle/electric kettle, glass kettle, stovetop kettle
    Toasters | :: 2-slice toaster, 4-slice toaster, toastie maker/sandwich maker
    Coffee machines | coffee makers; us:coffee makers
      Bean-to-cup machines | espresso machines :: bean-to-cup coffee machine/super-automatic espresso machine, manual espresso machine
      Filter coffee machines | drip coffee makers; us:drip coffee makers :: filter coffee machine/drip coffee maker, cafetiere/french press
      Pod coffee machines | capsule machines :: pod coffee machine, capsule coffee machine
    Blenders & food processors | blenders :: jug blender/countertop blender, hand blender/immersion blender, food processor, mini chopper
    Air fryers | :: single air fryer, dual basket air fryer, air fryer oven
    Microwaves | microwave ovens :: solo microwave, combination microwave, grill microwave
  Food storage | kitchen storage; ~containers
    Food containers | storage containers :: glass food containers, plastic food containers, lunch box
    Storage jars | canisters :: glass storage jar, tea coffee sugar canisters, pasta jar
    Bread bins | us:bread boxes :: bread bin/bread box, roll-top bread bin/roll-top bread box
    Kitchen bins | rubbish bins; us:trash cans; ~recycling :: pedal bin/step trash can, sensor bin, recycling bin set, compost caddy
Bathroom | bathrooms; ~bath {bath}
  Bathroom fixtures | sanitaryware; us:bathroom fixtures
    Taps | mixer taps; us:faucets :: basin mixer tap/bathroom faucet, bath filler tap/tub faucet, kitchen mixer tap/kitchen faucet
    Showers | ~shower systems
      Shower heads | us:showerheads :: rainfall shower head, handheld shower head, shower head and hose set
      Electric showers | :: 8.5kW electric shower, 9.5kW electric shower
      Shower enclosures | shower screens :: bath screen, quadrant shower enclosure, walk-in shower screen
    Toilets | toilet seats :: toilet seat, soft-close toilet seat, close-coupled toilet
    Basins | sinks; us:bathroom sinks :: countertop basin/vessel sink, pedestal basin/pedestal sink, cloakroom basin
  Bathroom storage | ~cabinets
    Bathroom cabinets | mirror cabinets; us:medicine cabinets :: mirrored bathroom cabinet/medicine cabinet, wall cabinet, tall bathroom cabinet
    Vanity units | vanities; us:vanities :: wall-hung vanity unit, floor-standing vanity unit
    Shower caddies | shelves; ~bathroom shelves :: shower caddy, corner shelf, over-door organiser
  Accessories | bathroom accessories
    Toilet roll holders | us:toilet paper holders :: toilet roll holder/toilet paper holder, toilet roll stand, toilet brush and holder
    Soap dispensers | ~soap dishes :: soap dispenser, soap dish, toothbrush holder
    Bathroom mirrors | :: LED bathroom mirror, round bathroom mirror, shaving mirror
  Bath textiles | bath linen; ~towels and mats {bedding}
    Towels | bath towels :: bath towel, hand towel, bath sheet, towel bale/towel set
    Bath mats | :: bath mat/bath rug, pedestal mat, memory foam bath mat
    Shower curtains | :: fabric shower curtain, shower curtain rings, shower curtain rail/shower curtain rod
Home textiles | soft furnishings; ~textiles and decor {textile}
  Bedding | bed linen {bedding}
    Duvets | quilts; us:comforters :: all-season duvet/all-season comforter, 10.5 tog duvet, summer duvet
    Duvet covers | duvet sets; us:comforter covers :: duvet cover set, reversible duvet cover, brushed cotton duvet cover
    Pillows | :: hollowfibre pillow, memory foam pillow, feather pillow
    Bed sheets | sheets :: fitted sheet, flat sheet, pillowcases
    Throws & blankets | throws :: knitted throw, fleece blanket, weighted blanket
  Curtains & blinds | window dressing; us:window treatments
    Curtains | drapes; us:drapes :: eyelet curtains/grommet curtains, pencil pleat curtains, blackout curtains, voile panels/sheer panels
    Blinds | us:shades :: roller blind/roller shade, venetian blind, roman blind/roman shade, vertical blind
    Curtain poles | curtain tracks; us:curtain rods :: curtain pole/curtain rod, curtain track, tie-backs
  Rugs | ~carpets; us:area rugs
    Living room rugs | area rugs :: shaggy rug, flatweave rug, runner rug, round rug
    Doormats | door mats :: coir doormat, washable doormat, personalised doormat
  Cushions | scatter cushions; us:throw pillows :: velvet cushion/velvet throw pillow, cushion cover/pillow cover, floor cushion, outdoor cushion
Home decor | decor; ~homeware {decor}
  Wall decor | wall art
    Pictures & prints | art prints :: framed print, canvas print, poster set
    Mirrors | wall mirrors :: round wall mirror, full-length mirror, overmantel mirror
    Clocks | wall clocks :: wall clock, mantel clock, alarm clock
    Photo frames | picture frames :: photo frame, multi-aperture frame, collage frame
  Home fragrance | fragrance; ~candles and diffusers
    Candles | :: scented candle, pillar candle, tealights/tea lights, candle jar
    Diffusers | reed diffusers :: reed diffuser, electric diffuser, wax melts
  Vases | ~decorative accessories :: glass vase, ceramic vase, bud vase, artificial flowers
  Seasonal decorations | festive decorations; us:holiday decor
    Christmas trees | artificial trees :: artificial christmas tree, pre-lit christmas tree, christmas tree stand
    Christmas decorations | baubles; us:ornaments; ~xmas decorations :: glass baubles/glass ornaments, tinsel garland, christmas wreath, tree topper
DIY & tools | diy; us:home improvement; ~tools and hardware {diy}
  Power tools | electric tools {power}
    Drills | drill drivers
      Cordless drills | combi drills :: 18V combi drill, cordless drill driver, cordless hammer drill
      Corded drills | :: corded hammer drill, SDS drill, rotary hammer drill
      Impact drivers | :: impact driver, impact wrench
    Power saws | saws
      Circular saws | :: cordless circular saw, corded circular saw, plunge saw/track saw
      Jigsaws | us:jig saws :: cordless jigsaw, corded jigsaw
      Mitre saws | us:miter saws :: sliding mitre saw/sliding miter saw, compound mitre saw/compound miter saw
    Sanders | :: orbital sander, detail sander, belt sander
    Angle grinders | grinders :: angle grinder, bench grinder
    Batteries & chargers | power tool batteries :: 18V battery pack, fast charger, twin battery pack
  Hand tools | ~manual tools
    Hammers | :: claw hammer, club hammer/sledge hammer, rubber mallet
    Screwdrivers | :: screwdriver set, precision screwdriver set, ratchet screwdriver
    Spanners | us:wrenches :: combination spanner set/combination wrench set, adjustable spanner/adjustable wrench, socket set
    Pliers | :: combination pliers, long-nose pliers/needle-nose pliers, locking pliers
    Measuring & marking | measuring tools; ~tape measures :: tape measure, spirit level/torpedo level, laser level, carpenter's pencil
    Tool storage | toolboxes; us:tool chests :: toolbox, tool bag, tool chest, pegboard
  Fixings | fasteners; us:fasteners
    Screws | :: wood screws, multi-purpose screws, decking screws/deck screws
    Nails | :: round wire nails, panel pins/brad nails, masonry nails
    Wall plugs | wall anchors; us:drywall anchors :: wall plugs/wall anchors, plasterboard fixings/drywall anchors, frame fixings
    Adhesives & sealants | glue; ~sealants :: silicone sealant, grab adhesive/construction adhesive, wood glue, decorators caulk
  Painting & decorating | decorating {paint}
    Paint | ~emulsion
      Interior paint | emulsion paint; us:wall paint :: matt emulsion/flat wall paint, silk emulsion/satin wall paint, ceiling paint, kitchen paint
      Exterior paint | masonry paint :: masonry paint, exterior gloss, fence paint
      Wood finishes | wood stains; ~varnish :: wood stain, clear varnish, decking oil/deck stain, wood preserver
    Brushes & rollers | painting tools :: paint brush set, paint roller kit, roller tray, paint pad
    Wallpaper | wall coverings :: patterned wallpaper, textured wallpaper, lining paper, wallpaper paste
    Decorating supplies | ~fillers :: masking tape/painter's tape, dust sheets/drop cloths, filler/spackle, sandpaper
  Electrical | electricals; ~wiring
    Extension leads | extension cables; us:power strips :: 4-way extension lead/power strip, cable reel, surge-protected extension lead
    Plugs & sockets | sockets; us:outlets :: double socket/duplex outlet, USB socket, plug-in timer
    Cable & wiring | cable :: twin and earth cable, cable clips, junction box
  Plumbing | ~pipes and fittings
    Pipes & fittings | :: copper pipe, push-fit fittings, compression fittings
    Plumbing tools | :: pipe cutter, pipe wrench, plunger
    Radiator valves | rad valves :: thermostatic radiator valve, lockshield valve, radiator bleed key
  Ladders | steps; ~ladders and steps
    Step ladders | step stools; us:step stools :: 3-tread step ladder, 5-tread step ladder, folding step stool
    Extension ladders | :: double extension ladder, telescopic ladder, combination ladder
  Safety & workwear | workwear; ~ppe :: work gloves, safety goggles, dust masks, knee pads
Heating & cooling | climate control; us:hvac {heat}
  Heaters | portable heaters; us:space heaters
    Electric heaters | fan heaters :: fan heater/space heater, oil-filled radiator, convector heater, panel heater
    Electric fires | fireplaces; us:electric fireplaces :: wall-mounted electric fire, freestanding electric stove, inset electric fire
  Fans & air coolers | fans :: pedestal fan, tower fan, desk fan, evaporative air cooler/swamp cooler
  Air treatment | ~air quality
    Dehumidifiers | :: compressor dehumidifier, desiccant dehumidifier, moisture trap
    Air purifiers | :: HEPA air purifier, compact air purifier
    Humidifiers | :: ultrasonic humidifier, cool mist humidifier
  Thermostats | heating controls; ~smart thermostats :: smart thermostat, programmable thermostat, room thermostat
Cleaning & laundry | household; ~cleaning supplies {clean}
  Vacuum cleaners | vacuums; us:vacuums {appliance}
    Upright vacuums | :: bagless upright vacuum, pet upright vacuum
    Cordless vacuums | stick vacuums :: cordless stick vacuum, handheld vacuum, 2-in-1 cordless vacuum
    Robot vacuums | robotic vacuums :: robot vacuum, robot vacuum and mop
    Cylinder vacuums | us:canister vacuums :: bagged cylinder vacuum/bagged canister vacuum, bagless cylinder vacuum/bagless canister vacuum
  Floor care | ~mops
    Mops & buckets | mops :: spin mop and bucket, flat mop, microfibre mop
    Steam cleaners | steam mops {appliance} :: steam mop, handheld steam cleaner
    Carpet cleaners | carpet washers {appliance} :: carpet washer/carpet shampooer, spot cleaner
  Cleaning products | cleaners; ~cleaning chemicals
    Surface cleaners | sprays; us:all-purpose cleaners :: multi-surface spray, kitchen cleaner, glass cleaner
    Bathroom cleaners | :: limescale remover/lime remover, toilet cleaner, mould remover
    Cloths & sponges | cleaning cloths :: microfibre cloths, scourers/scrub pads, sponges, dusters
  Laundry | ~washing
    Laundry detergent | washing powder; us:laundry soap :: laundry liquid, washing powder/powder detergent, laundry pods, fabric conditioner/fabric softener
    Clothes airers | airers; us:drying racks :: clothes airer/drying rack, heated airer, rotary washing line/rotary clothesline
    Laundry baskets | us:laundry hampers :: laundry basket, laundry hamper, laundry bag
    Irons | steamers {appliance} :: steam iron, steam generator iron, garment steamer, ironing board
Pet supplies | pets; ~pet care {pet}
  Dog supplies | dogs
    Dog beds | :: orthopaedic dog bed, donut dog bed, dog crate mat
    Dog toys | :: rope dog toy, chew toy, ball launcher
    Dog leads | collars; us:dog leashes :: dog lead/dog leash, dog harness, dog collar
    Dog food | :: dry dog food, wet dog food, dog treats
  Cat supplies | cats
    Cat trees | scratchers; ~cat beds :: cat tree, scratching post, cat bed
    Cat litter | litter trays; us:litter boxes :: clumping cat litter, litter tray/litter box, litter scoop
    Cat food | :: dry cat food, wet cat food pouches, cat treats
  Small animal supplies | small pets
    Hutches & runs | rabbit hutches :: rabbit hutch, guinea pig run, hutch cover
    Small animal bedding | hay :: meadow hay, wood shavings, paper bedding
  Aquatics | fish keeping; us:aquariums :: aquarium tank, aquarium filter, fish food, pond pump
"""

# Modifier profiles: what an item title may carry beside its noun. Sizes are (value, unit) and each supplier
# renders them its own way (see wording.render_size). Prices are (low, high) in the marketplace currency.
PROFILES: dict[str, dict] = {
    "plant": {
        "adjectives": [
            "hardy",
            "compact",
            "evergreen",
            "scented",
            "dwarf",
            "vigorous",
            "pot-grown",
            "organic",
        ],
        "materials": [],
        "colours": ["red", "white", "purple", "yellow", "pink", "mixed", "blue", "orange"],
        "sizes": [("9", "cm"), ("2", "L"), ("3", "L"), ("3", "pack"), ("6", "pack"), ("12", "pack")],
        "price": (3, 45),
    },
    "seed": {
        "adjectives": ["organic", "heirloom", "F1 hybrid", "easy-grow", "dwarf", "trailing"],
        "materials": [],
        "colours": ["mixed", "white", "red", "yellow"],
        "sizes": [("50", "seeds"), ("100", "seeds"), ("250", "seeds"), ("1", "kg"), ("500", "g")],
        "price": (1.5, 25),
    },
    "garden_supply": {
        "adjectives": ["organic", "peat-free", "fast-acting", "concentrated", "pet-friendly", "ready-to-use"],
        "materials": ["steel", "recycled plastic"],
        "colours": [],
        "sizes": [("1", "L"), ("5", "L"), ("40", "L"), ("50", "L"), ("2", "kg"), ("10", "kg"), ("15", "kg")],
        "price": (3, 60),
    },
    "tool": {
        "adjectives": [
            "heavy duty",
            "lightweight",
            "ergonomic",
            "professional",
            "compact",
            "telescopic",
            "soft-grip",
        ],
        "materials": [
            "stainless steel",
            "carbon steel",
            "forged steel",
            "ash-handled",
            "fibreglass-handled",
            "aluminium",
        ],
        "colours": ["green", "orange", "black", "red"],
        "sizes": [
            ("15", "cm"),
            ("20", "cm"),
            ("25", "cm"),
            ("70", "cm"),
            ("100", "cm"),
            ("15", "m"),
            ("30", "m"),
        ],
        "price": (5, 90),
    },
    "power": {
        "adjectives": ["cordless", "brushless", "compact", "high-power", "lightweight", "variable-speed"],
        "materials": [],
        "colours": ["green", "orange", "blue", "yellow"],
        "sizes": [("18", "V"), ("36", "V"), ("32", "cm"), ("37", "cm"), ("40", "cm"), ("1200", "W")],
        "price": (35, 650),
    },
    "outdoor": {
        "adjectives": ["weatherproof", "folding", "stackable", "reclining", "portable", "heavy duty"],
        "materials": [
            "rattan-effect",
            "FSC hardwood",
            "powder-coated steel",
            "aluminium",
            "acacia wood",
            "teak",
        ],
        "colours": ["grey", "natural", "anthracite", "black", "green", "cream"],
        "sizes": [
            ("2", "seater"),
            ("4", "seater"),
            ("6", "seater"),
            ("180", "cm"),
            ("300x300", "cmx"),
            ("60", "cm"),
        ],
        "price": (15, 950),
    },
    "light": {
        "adjectives": ["dimmable", "warm white", "rechargeable", "solar-powered", "vintage-style", "modern"],
        "materials": ["brass", "matt black", "chrome", "opal glass", "rattan", "ceramic", "satin nickel"],
        "colours": ["white", "black", "gold", "grey"],
        "sizes": [("5", "W"), ("9", "W"), ("10", "m"), ("30", "cm"), ("4", "pack")],
        "price": (4, 260),
    },
    "furn": {
        "adjectives": ["modern", "compact", "solid", "scandi-style", "mid-century", "upholstered"],
        "materials": ["oak", "solid pine", "walnut-effect", "velvet", "linen-look fabric", "metal", "rattan"],
        "colours": ["grey", "natural", "charcoal", "sage green", "cream", "black", "white", "navy"],
        "sizes": [("90", "cm"), ("120", "cm"), ("150", "cm"), ("180", "cm"), ("120x60", "cmx")],
        "price": (35, 1250),
    },
    "bed": {
        "adjectives": ["modern", "upholstered", "solid", "storage", "orthopaedic", "low-profile"],
        "materials": ["oak", "solid pine", "velvet", "linen-look fabric", "metal", "memory foam"],
        "colours": ["grey", "natural", "charcoal", "cream", "white", "navy"],
        "sizes": [("single", "bed"), ("double", "bed"), ("king", "bed"), ("super king", "bed")],
        "price": (60, 1100),
    },
    "textile": {
        "adjectives": ["soft", "machine washable", "reversible", "hand-woven", "textured", "striped"],
        "materials": ["cotton", "linen", "wool", "velvet", "jute", "recycled polyester", "bamboo"],
        "colours": ["ochre", "sage", "grey", "navy", "terracotta", "ivory", "blush pink", "charcoal"],
        "sizes": [("45x45", "cmx"), ("120x170", "cmx"), ("160x230", "cmx"), ("140x200", "cmx")],
        "price": (6, 260),
    },
    "bedding": {
        "adjectives": ["hypoallergenic", "anti-allergy", "soft-touch", "non-iron", "brushed", "cooling"],
        "materials": [
            "egyptian cotton",
            "cotton",
            "microfibre",
            "duck feather",
            "hollowfibre",
            "bamboo",
            "linen",
        ],
        "colours": ["white", "grey", "navy", "sage", "mustard"],
        "sizes": [("single", "bed"), ("double", "bed"), ("king", "bed"), ("10.5", "tog"), ("4.5", "tog")],
        "price": (8, 160),
    },
    "decor": {
        "adjectives": ["decorative", "handmade", "minimalist", "vintage-style", "botanical"],
        "materials": ["glass", "ceramic", "gold metal", "mango wood", "marble-effect", "stoneware"],
        "colours": ["white", "black", "gold", "green", "blush pink"],
        "sizes": [("20", "cm"), ("30", "cm"), ("60", "cm"), ("50x70", "cmx"), ("3", "pack")],
        "price": (4, 160),
    },
    "kitchen": {
        "adjectives": [
            "non-stick",
            "dishwasher-safe",
            "induction-ready",
            "oven-safe",
            "professional",
            "stackable",
        ],
        "materials": [
            "stainless steel",
            "cast iron",
            "ceramic",
            "glass",
            "bamboo",
            "silicone",
            "enamelled steel",
        ],
        "colours": ["black", "red", "cream", "sage", "grey", "white"],
        "sizes": [
            ("20", "cm"),
            ("24", "cm"),
            ("28", "cm"),
            ("1.5", "L"),
            ("3", "L"),
            ("4", "piece"),
            ("12", "piece"),
        ],
        "price": (3, 190),
    },
    "appliance": {
        "adjectives": ["compact", "digital", "quiet", "fast-boil", "energy-saving", "programmable"],
        "materials": ["stainless steel", "brushed steel", "glass"],
        "colours": ["black", "white", "cream", "silver", "red"],
        "sizes": [("1.7", "L"), ("1500", "W"), ("2200", "W"), ("4", "L"), ("20", "L")],
        "price": (18, 450),
    },
    "bath": {
        "adjectives": ["soft-close", "anti-slip", "wall-mounted", "quick-dry", "thermostatic", "modern"],
        "materials": ["chrome", "brushed brass", "matt black", "ceramic", "bamboo", "stainless steel"],
        "colours": ["white", "grey", "black"],
        "sizes": [("40", "cm"), ("60", "cm"), ("80", "cm"), ("50x70", "cmx")],
        "price": (5, 420),
    },
    "diy": {
        "adjectives": ["professional", "heavy duty", "magnetic", "compact", "multi-purpose", "quick-drying"],
        "materials": ["chrome vanadium", "zinc-plated", "galvanised", "hardened steel", "fibreglass"],
        "colours": [],
        "sizes": [("100", "piece"), ("200", "piece"), ("5", "m"), ("4x40", "mm"), ("8", "piece")],
        "price": (2, 140),
    },
    "paint": {
        "adjectives": ["quick-drying", "washable", "low-odour", "one-coat", "weatherproof"],
        "materials": [],
        "colours": ["brilliant white", "magnolia", "duck egg", "charcoal", "sage green", "natural oak"],
        "sizes": [("2.5", "L"), ("5", "L"), ("750", "ml"), ("10", "L")],
        "price": (4, 65),
    },
    "heat": {
        "adjectives": ["energy-efficient", "quiet", "portable", "smart", "remote-controlled", "oscillating"],
        "materials": [],
        "colours": ["white", "black", "grey"],
        "sizes": [("2000", "W"), ("10", "L"), ("12", "L"), ("40", "cm")],
        "price": (18, 380),
    },
    "clean": {
        "adjectives": [
            "antibacterial",
            "eco",
            "fragrance-free",
            "lavender-scented",
            "concentrated",
            "reusable",
        ],
        "materials": ["microfibre", "cellulose"],
        "colours": [],
        "sizes": [("500", "ml"), ("750", "ml"), ("1", "L"), ("5", "L"), ("10", "pack"), ("24", "pack")],
        "price": (1.5, 45),
    },
    "pet": {
        "adjectives": ["durable", "washable", "grain-free", "chew-proof", "natural", "weatherproof"],
        "materials": ["plush", "rope", "nylon", "leather", "wood"],
        "colours": ["grey", "brown", "blue", "red"],
        "sizes": [("2", "kg"), ("12", "kg"), ("60", "cm"), ("90", "cm"), ("12", "pack")],
        "price": (3, 160),
    },
}

# British spelling -> US spelling, applied word by word (case of the first letter kept).
US_SPELLINGS = {
    "colour": "color",
    "colours": "colors",
    "aluminium": "aluminum",
    "fibreglass": "fiberglass",
    "microfibre": "microfiber",
    "hollowfibre": "hollowfiber",
    "galvanised": "galvanized",
    "orthopaedic": "orthopedic",
    "enamelled": "enameled",
    "low-odour": "low-odor",
    "grey": "gray",
    "personalised": "personalized",
    "organiser": "organizer",
    "organisers": "organizers",
    "metre": "meter",
    "centre": "center",
    "mould": "mold",
    "mitre": "miter",
    "litre": "liter",
    "fertiliser": "fertilizer",
    "jewellery": "jewelry",
    "cosy": "cozy",
    "tealights": "tea lights",
    "storey": "story",
    "favourite": "favorite",
    "catalogue": "catalog",
    "moulded": "molded",
}

# Abbreviations a hurried seller uses in tags.
TAG_ABBREVIATIONS = {
    "accessories": ["acc.", "accs"],
    "garden": ["gdn", "grdn"],
    "outdoor": ["outdr"],
    "furniture": ["furn."],
    "lighting": ["ltg"],
    "kitchen": ["kit."],
    "bathroom": ["bthrm", "bath"],
    "stainless": ["s/s"],
    "electric": ["elec."],
    "cordless": ["cdls"],
    "decorations": ["decs"],
    "christmas": ["xmas"],
    "barbecue": ["bbq"],
    "barbecues": ["bbqs"],
    "vacuum": ["vac"],
    "vacuums": ["vacs"],
    "and": ["&", "+", "n"],
    "small": ["sm."],
    "supplies": ["supp."],
    "extension": ["ext."],
    "machines": ["mach."],
}

IRREGULAR_PLURALS = {
    "knife": "knives",
    "shelf": "shelves",
    "leaf": "leaves",
    "loaf": "loaves",
    "mouse": "mice",
    "chassis": "chassis",
    "series": "series",
    "grass": "grasses",
    "glass": "glasses",
    "cactus": "cacti",
    "compost": "compost",
    "charcoal": "charcoal",
    "seed": "seeds",
    "fuel": "fuel",
    "bedding": "bedding",
    "hedging": "hedging",
    "lighting": "lighting",
    "storage": "storage",
    "furniture": "furniture",
    "cutlery": "cutlery",
    "wallpaper": "wallpaper",
    "paint": "paint",
    "feed": "feed",
    "mulch": "mulch",
    "glassware": "glassware",
    "tableware": "tableware",
    "cookware": "cookware",
    "bakeware": "bakeware",
    "plumbing": "plumbing",
    "workwear": "workwear",
    "laundry": "laundry",
    "hay": "hay",
    "food": "food",
    "litter": "litter",
    "care": "care",
    "fragrance": "fragrance",
    "aquatics": "aquatics",
}

# Words a supplier tacks on to a category label.
QUALIFIERS_TIDY = ["{x} & Accessories", "{x} Range", "All {x}", "{x} (Selected)"]
QUALIFIERS_US = ["{x} & More", "{x} Essentials", "Shop {x}", "{x} Collection"]


@dataclass
class OutlineNode:
    """One parsed outline line; `parent` is the index of the parent line (None at the top)."""

    label: str
    parent: int | None
    profile: str
    synonyms: list[str] = field(default_factory=list)  # published as altLabel
    hidden: list[str] = field(default_factory=list)  # used by suppliers only
    us_terms: list[str] = field(default_factory=list)  # US wording, used by the US-style supplier
    nouns: list[tuple[str, str]] = field(default_factory=list)  # (main wording, alternative wording)
    deprecated: bool = False


_PROFILE = re.compile(r"\{(\w+)\}")
_DEPRECATED = re.compile(r"\[deprecated\]")


def parse_outline(text: str) -> list[OutlineNode]:
    """Parse the indented outline into nodes in document order (parents before children)."""
    nodes: list[OutlineNode] = []
    stack: list[tuple[int, int]] = []  # (indent, node index)
    for raw in text.splitlines():
        if not raw.strip():
            continue
        indent = (len(raw) - len(raw.lstrip(" "))) // 2
        line = raw.strip()
        m = _PROFILE.search(line)
        profile = m.group(1) if m else None
        line = _PROFILE.sub("", line)
        deprecated = bool(_DEPRECATED.search(line))
        line = _DEPRECATED.sub("", line)
        head, _, noun_text = line.partition("::")
        label, _, syn_text = head.partition("|")
        while stack and stack[-1][0] >= indent:
            stack.pop()
        parent = stack[-1][1] if stack else None
        if profile is None:
            profile = nodes[parent].profile if parent is not None else "decor"
        node = OutlineNode(
            label=" ".join(label.split()), parent=parent, profile=profile, deprecated=deprecated
        )
        for syn in (s.strip() for s in syn_text.split(";")):
            if syn.startswith("~"):
                node.hidden.append(syn[1:].strip())
            elif syn.startswith("us:"):
                node.us_terms.append(syn[3:].strip())
            elif syn:
                node.synonyms.append(syn)
        for noun in (n.strip() for n in noun_text.split(",")):
            if noun:
                main, _, alt = noun.partition("/")
                node.nouns.append((main.strip(), (alt or main).strip()))
        nodes.append(node)
        stack.append((indent, len(nodes) - 1))
    return nodes


# Which size units fit which nouns (regular expressions on the noun); a unit not listed fits nothing.
# Keeps titles believable: no "greenhouse 2 seater", no "wild bird seed mix 60cm".
_LIQUIDS = (
    r"compost(?! bin| tumbler| caddy)|\bfeed\b|paint(?! brush| roller| pad)|emulsion|gloss|\bstain\b|"
    r"varnish|\boil\b(?!-)|preserver|(?<!steam )(?<!spot )cleaner|spray(?! gun)|remover|liquid|detergent|"
    r"conditioner|softener|weedkiller|\bmix\b|soil|mulch|\bbark\b|chippings|top dressing"
)
CONSUMABLES = (
    _LIQUIDS + r"|\bseeds?\b(?! feeder)|food(?! processor| containers)|treats|pouches|pellets|"
    r"charcoal(?! barbecue| grill)|briquettes|firelighters|fire starters|\bhay\b|litter(?! tray| scoop| box)|"
    r"shavings|mealworms|suet balls|hearts|powder|\bpods\b|sealant|adhesive|glue|caulk|filler|"
    r"spackle|paste|turf|\bsod\b|wax melts|tealights|tea lights"
)
SIZE_FITS = {
    "seater": r"sofa|dining set|lounge set|sofa set|bench|bistro",
    "bed": r"\bbed\b|bed frame|mattress|duvet|comforter|sheet|pillowcase|topper|divan|box spring|cover set",
    "tog": r"duvet|comforter",
    "seeds": r"seeds$",
    "piece": r"set\b|cutlery|flatware|screws|nails|pins|fixings|plugs|anchors",
    "V": r"cordless|battery|drill|driver|saw|sander|grinder|trimmer|mower|blower|chainsaw|wrench|strimmer|"
    r"weed eater",
    "W": r"bulb|light|lamp|heater|kettle|microwave|blender|toaster|fryer|vacuum|iron|fan\b|processor|chopper|"
    r"coffee machine|espresso|coffee maker|scarifier|dethatcher|electric|steamer|shower|dehumidifier",
    "L": _LIQUIDS + r"|kettle|pan\b|stockpot|casserole|dutch oven|\bbin\b|butt|barrel|can\b|jar|container|"
    r"fryer|humidifier|dehumidifier|vacuum|pot\b|caddy|lunch box",
    "ml": r"spray(?! gun)|(?<!steam )(?<!spot )cleaner|remover|liquid|paint(?! brush| roller| pad)|varnish|\bstain\b|"
    r"\boil\b(?!-)|sealant|adhesive|glue|reed diffuser|conditioner|softener|\bfeed\b|weedkiller",
    "kg": r"\bseed\b(?! feeder)|seed mix|\bfood\b(?! processor| containers)|\bfeed\b|pellets|"
    r"charcoal(?! barbecue| grill)|briquettes|\bhay\b|\blitter\b(?! tray| scoop| box)|compost(?! bin| tumbler| caddy)|"
    r"treats|suet balls|hearts|mealworms|chippings|\bbark\b|mulch|powder|top dressing",
    "g": r"\bseeds$|\bfood$|treats|mealworms|hearts",
    "m": r"hose|cable|lights|string|festoon|tape measure|edging|netting|\blead\b|leash|reel|line",
    "mm": r"screws|nails|pins|plugs|anchors|fixings",
    "pack": r"\bpots?\b(?! cover)|bulbs|plants|plugs|cloths|sponges|scourers|scrub pads|dusters|lights|candles?|mugs|"
    r"glasses|tumblers|flutes|plates|bowls|cups|napkins|placemats|hooks|battery|baubles|ornaments|"
    r"frame|pods|treats|pouches|hangers|cushions?|lanterns|spoons|teaspoons|containers|jars?|clips|"
    r"balls|masks|gloves|tealights|tea lights|shelves|pillowcases",
}
# cm / cmx (dimensions) fit every solid thing: anything that is not a consumable.

# Modifiers (adjectives or materials) that fit only some nouns; any modifier not listed fits every noun.
MODIFIER_FITS = {
    "reclining": r"chair|lounger|sofa|armchair|recliner|chaise",
    "stackable": r"chair|stool|bench|box|container|\bpots?\b|bowls?|mugs|glasses|tumblers",
    "folding": r"chair|table|saw|ladder|stool|bench|airer|desk|\bbed\b|rack",
    "telescopic": r"loppers|pruners?|ladder|saw|pole|trimmer|hose",
    "ash-handled": r"spade|fork|hoe|rake|trowel|hammer|saw|loppers|shears|secateurs",
    "fibreglass-handled": r"spade|fork|hoe|rake|trowel|hammer|saw|loppers|shears|secateurs",
    "soft-grip": r"secateurs|pruners|shears|trowel|fork|loppers|saw|screwdriver|pliers|hammer",
    "heavy duty": r"fork|spade|wheelbarrow|cart|trolley|shed|cover|bench|table|gazebo|hose|box",
    "portable": r"barbecue|grill|heater|oven|fire|chiminea|fan|lounger|chair|table|fire pit|stool|speaker",
    "weatherproof": r"cover|cushion|furniture|chair|table|bench|rug|light|lantern|box|store|shed|sofa|set",
    "plush": r"toy|bed|cushion|mat",
    "rope": r"toy",
    "chew-proof": r"toy|bed|lead|leash|harness|collar|mat",
    "grain-free": r"food|treats|pouches",
    "washable": r"bed|mat|rug|cover|doormat|cushion|curtain|throw",
    "thermostatic": r"tap|faucet|shower|valve|filler",
    "soft-close": r"toilet|seat|cabinet|vanity",
    "anti-slip": r"mat|rug|caddy|shelf|step",
    "quick-dry": r"towel|mat|sheet|rug|robe",
    "wall-mounted": r"cabinet|mirror|shelf|tap|faucet|holder|dispenser|heater|reel|rack|fire|vanity",
    "dimmable": r"light|lamp|bulb|pendant|chandelier|spotlight|downlight|strip",
    "warm white": r"light|lamp|bulb|pendant|spotlight|downlight|strip",
    "rechargeable": r"light|lamp|lantern|spotlight|floodlight|trimmer|vacuum",
    "solar-powered": r"light|lantern|spotlight|floodlight|fountain|post|bollard|deck",
    "fast-boil": r"kettle",
    "induction-ready": r"pan|skillet|saucepan|stockpot|wok|casserole|dutch oven|kettle",
    "non-stick": r"pan|skillet|saucepan|wok|tray|tin|sheet|griddle|casserole|stockpot",
    "oven-safe": r"pan|skillet|dish|casserole|dutch oven|tray|tin|bowl|container|stockpot",
    "upholstered": r"chair|sofa|bed|stool|bench|headboard|footstool|ottoman|pouffe|pouf",
    "storage": r"\bbed\b|footstool|ottoman|bench",
    "orthopaedic": r"mattress|\bbed\b|topper|pillow",
    "memory foam": r"mattress|topper|pillow|mat|bed",
    "velvet": r"chair|sofa|bed|stool|cushion|pillow|footstool|ottoman|pouffe|pouf|headboard|curtain|throw",
    "linen-look fabric": r"chair|sofa|bed|stool|bench|footstool|ottoman|pouffe|pouf|headboard",
    "duck feather": r"pillow|duvet|comforter|cushion",
    "hollowfibre": r"pillow|duvet|comforter|cushion",
    "cast iron": r"pan|skillet|casserole|dutch oven|griddle|chiminea|bench|stand|wok|pot\b",
    "silicone": r"spatula|mat|tray|mould|brush|spoon|tongs|lid|container|utensil|pan",
    "teak": r"chair|table|bench|set|lounger|bed|sofa|planter|box|stool|caddy|mat|shelf",
    "acacia wood": r"chair|table|bench|set|lounger|bed|sofa|planter|box|stool|shelf",
    "FSC hardwood": r"chair|table|bench|set|lounger|bed|sofa|planter|box|stool|shed|swing",
    "rattan-effect": r"chair|table|set|lounger|sofa|bed|planter|box|swing|egg",
    "rattan": r"shade|pendant|lamp",
}
